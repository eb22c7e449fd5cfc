#include "output.h"

#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

static int fail_after;   /* test hook: writes left before a failure */

GP_EXPORT void gp_output_fail_after(int writes)
{
	fail_after = writes;
}

void gp_output_set_init(struct gp_output_set *set)
{
	memset(set, 0, sizeof(*set));
}

void gp_output_set_finish(struct gp_output_set *set)
{
	for (size_t i = 0; i < set->count; i++) {
		free(set->files[i].name);
		gp_buffer_finish(&set->files[i].content);
	}
	free(set->files);
	gp_output_set_init(set);
}

/* Plain names only: no folder part, no dot files, no control characters. */
static bool name_is_plain(const char *name)
{
	if (!*name || name[0] == '.' || strlen(name) > 200)
		return false;
	for (const unsigned char *p = (const unsigned char *)name; *p; p++)
		if (*p < 0x20 || *p == 0x7f || *p == '/' || *p == '\\')
			return false;
	return true;
}

struct gp_buffer *gp_output_add(struct gp_output_set *set, const char *name,
				struct gp_diag *diag)
{
	if (!name_is_plain(name)) {
		gp_diag_error(diag, NULL,
			      "output name '%s' is not a plain file name", name);
		return NULL;
	}
	for (size_t i = 0; i < set->count; i++)
		if (strcmp(set->files[i].name, name) == 0) {
			gp_diag_error(diag, NULL, "output '%s' written twice",
				      name);
			return NULL;
		}
	if (set->count == set->capacity) {
		size_t capacity = set->capacity ? set->capacity * 2 : 8;
		struct gp_output_file *files =
			realloc(set->files, capacity * sizeof(*files));
		if (!files)
			goto oom;
		set->files = files;
		set->capacity = capacity;
	}
	struct gp_output_file *file = &set->files[set->count];
	file->name = strdup(name);
	if (!file->name)
		goto oom;
	gp_buffer_init(&file->content);
	set->count++;
	return &file->content;
oom:
	gp_diag_error(diag, NULL, "out of memory");
	return NULL;
}

static bool write_all(int fd, const char *data, size_t size)
{
	while (size > 0) {
		if (fail_after > 0 && --fail_after == 0) {
			errno = ENOSPC;
			return false;
		}
		size_t chunk = size > (1u << 20) ? (1u << 20) : size;
		ssize_t n = write(fd, data, chunk);
		if (n < 0 && errno == EINTR)
			continue;
		if (n <= 0)
			return false;
		data += n;
		size -= (size_t)n;
	}
	return true;
}

static char *join(const char *folder, const char *name)
{
	size_t length = strlen(folder) + strlen(name) + 2;
	char *path = malloc(length);
	if (path)
		snprintf(path, length, "%s/%s", folder, name);
	return path;
}

/* Writes one file under a temporary name; returns that name. */
static char *write_temporary(const char *folder,
			     const struct gp_output_file *file,
			     struct gp_diag *diag)
{
	char *path = malloc(strlen(folder) + strlen(file->name) + 16);
	if (!path) {
		gp_diag_error(diag, NULL, "out of memory");
		return NULL;
	}
	sprintf(path, "%s/.%s.XXXXXX", folder, file->name);
	int fd = mkstemp(path);
	if (fd < 0) {
		gp_diag_error(diag, NULL, "%s: cannot write in this folder: %s",
			      folder, strerror(errno));
		free(path);
		return NULL;
	}
	bool ok = !file->content.failed &&
		  write_all(fd, file->content.data ? file->content.data : "",
			    file->content.size) &&
		  fchmod(fd, 0644) == 0 && fsync(fd) == 0;
	int saved = errno;
	ok = close(fd) == 0 && ok;
	if (!ok) {
		gp_diag_error(diag, NULL, "%s/%s: cannot write: %s", folder,
			      file->name,
			      file->content.failed ? "out of memory"
						   : strerror(saved ? saved
								    : errno));
		unlink(path);
		free(path);
		return NULL;
	}
	return path;
}

/* Creates folder if missing; *created says whether this call made it. */
static bool make_folder(const char *folder, bool *created,
			struct gp_diag *diag)
{
	struct stat st;
	*created = false;
	if (stat(folder, &st) == 0) {
		if (S_ISDIR(st.st_mode))
			return true;
		return gp_diag_error(diag, NULL,
				     "%s: exists and is not a folder", folder);
	}
	if (mkdir(folder, 0777) == 0) {
		*created = true;
		return true;
	}
	return gp_diag_error(diag, NULL, "%s: cannot create the folder: %s",
			     folder, strerror(errno));
}

/* A folder where an output file should go would make its rename fail
 * after others were done: refuse before anything is written. */
static bool check_targets(const struct gp_output_set *set,
			  const char *folder, struct gp_diag *diag)
{
	for (size_t i = 0; i < set->count; i++) {
		char *path = join(folder, set->files[i].name);
		struct stat st;
		bool in_way = path && lstat(path, &st) == 0 &&
			      S_ISDIR(st.st_mode);
		free(path);
		if (!path)
			return gp_diag_error(diag, NULL, "out of memory");
		if (in_way)
			return gp_diag_error(diag, NULL,
					     "%s/%s: a folder is in the way of "
					     "this output file", folder,
					     set->files[i].name);
	}
	return true;
}

/* One file being put in place: its temporary, and a hard link to what
 * was there before (NULL when nothing was), kept until every rename is
 * done so that a failure can put the old file back. */
struct commit_entry {
	char *temporary;
	char *backup;
	bool existed;             /* something had the final name before */
	bool renamed;
};

static int fail_renames;  /* test hook: renames left before a failure */

GP_EXPORT void gp_output_fail_rename_after(int renames)
{
	fail_renames = renames;
}

static int do_rename(const char *from, const char *to)
{
	if (fail_renames > 0 && --fail_renames == 0) {
		errno = EIO;
		return -1;
	}
	return rename(from, to);
}

/* Keeps the file at final (if any) reachable under a backup name.  On a
 * file system without hard links the previous file cannot be kept; a
 * failed rename then leaves the new complete file in its place. */
static bool keep_backup(const char *folder, const char *name,
			struct commit_entry *e, struct gp_diag *diag)
{
	char *final = join(folder, name);
	char *backup = malloc(strlen(folder) + strlen(name) + 24);
	struct stat st;
	bool ok = final && backup;
	if (!ok)
		gp_diag_error(diag, NULL, "out of memory");
	e->existed = ok && lstat(final, &st) == 0;
	for (int attempt = 0; ok && e->existed && attempt < 100; attempt++) {
		sprintf(backup, "%s/.%s.old%d", folder, name, attempt);
		if (link(final, backup) == 0) {
			e->backup = backup;
			backup = NULL;
			break;
		}
		if (errno != EEXIST)
			break;
	}
	free(backup);
	free(final);
	return ok;
}

/* Undoes the renames done so far: old files back, new ones removed. */
static void roll_back(const struct gp_output_set *set, const char *folder,
		      struct commit_entry *entries)
{
	for (size_t i = 0; i < set->count; i++) {
		if (!entries[i].renamed)
			continue;
		char *final = join(folder, set->files[i].name);
		if (!final)
			continue;
		if (entries[i].backup) {
			if (rename(entries[i].backup, final) == 0) {
				free(entries[i].backup);
				entries[i].backup = NULL;
			}
		} else if (!entries[i].existed) {
			unlink(final);
		}
		free(final);
	}
}

static bool put_in_place(const struct gp_output_set *set, const char *folder,
			 struct commit_entry *entries, struct gp_diag *diag)
{
	for (size_t i = 0; i < set->count; i++)
		if (!keep_backup(folder, set->files[i].name, &entries[i],
				 diag))
			return false;
	for (size_t i = 0; i < set->count; i++) {
		char *final = join(folder, set->files[i].name);
		if (!final || do_rename(entries[i].temporary, final) != 0) {
			free(final);
			roll_back(set, folder, entries);
			return gp_diag_error(diag, NULL, "%s/%s: cannot rename "
					     "into place: %s", folder,
					     set->files[i].name,
					     final ? strerror(errno)
						   : "out of memory");
		}
		free(final);
		free(entries[i].temporary);
		entries[i].temporary = NULL;
		entries[i].renamed = true;
	}
	return true;
}

bool gp_output_commit(const struct gp_output_set *set, const char *folder,
		      struct gp_diag *diag)
{
	bool created;
	if (!make_folder(folder, &created, diag))
		return false;
	struct commit_entry *entries = calloc(set->count ? set->count : 1,
					      sizeof(*entries));
	bool ok = entries && check_targets(set, folder, diag);
	if (!entries)
		gp_diag_error(diag, NULL, "out of memory");
	for (size_t i = 0; ok && i < set->count; i++) {
		entries[i].temporary = write_temporary(folder, &set->files[i],
						       diag);
		ok = entries[i].temporary != NULL;
	}
	ok = ok && put_in_place(set, folder, entries, diag);
	for (size_t i = 0; entries && i < set->count; i++) {
		if (entries[i].temporary)
			unlink(entries[i].temporary);
		if (entries[i].backup)
			unlink(entries[i].backup);
		free(entries[i].temporary);
		free(entries[i].backup);
	}
	free(entries);
	if (!ok && created)
		rmdir(folder); /* a failed run leaves no new folder either */
	return ok;
}
