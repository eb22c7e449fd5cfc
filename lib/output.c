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

static bool make_folder(const char *folder, struct gp_diag *diag)
{
	struct stat st;
	if (stat(folder, &st) == 0) {
		if (S_ISDIR(st.st_mode))
			return true;
		return gp_diag_error(diag, NULL,
				     "%s: exists and is not a folder", folder);
	}
	if (mkdir(folder, 0777) == 0)
		return true;
	return gp_diag_error(diag, NULL, "%s: cannot create the folder: %s",
			     folder, strerror(errno));
}

bool gp_output_commit(const struct gp_output_set *set, const char *folder,
		      struct gp_diag *diag)
{
	if (!make_folder(folder, diag))
		return false;
	char **temporary = calloc(set->count ? set->count : 1,
				  sizeof(*temporary));
	if (!temporary)
		return gp_diag_error(diag, NULL, "out of memory");
	bool ok = true;
	for (size_t i = 0; ok && i < set->count; i++) {
		temporary[i] = write_temporary(folder, &set->files[i], diag);
		ok = temporary[i] != NULL;
	}
	for (size_t i = 0; ok && i < set->count; i++) {
		char *final = join(folder, set->files[i].name);
		if (!final || rename(temporary[i], final) != 0) {
			ok = gp_diag_error(diag, NULL, "%s/%s: cannot rename "
					   "into place: %s", folder,
					   set->files[i].name, strerror(errno));
		} else {
			free(temporary[i]);
			temporary[i] = NULL;
		}
		free(final);
	}
	for (size_t i = 0; i < set->count; i++) {
		if (temporary[i])
			unlink(temporary[i]);
		free(temporary[i]);
	}
	free(temporary);
	return ok;
}
