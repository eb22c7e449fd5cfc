/* renameat2 and flock are Linux/BSD calls, beyond POSIX */
#define _GNU_SOURCE
#include "output.h"

#include "array.h"

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

static int fail_after;   /* test hook: writes left before a failure */
static int kill_at;      /* test hook: the step that kills the process */
static int steps;        /* steps of the current commit */

void gp_output_kill_at(int step)
{
	kill_at = step;
}

/* Called before every change a commit makes to the disk, so that a test
 * can kill the process between any two of them. */
static void step(void)
{
	if (kill_at > 0 && ++steps == kill_at)
		raise(SIGKILL);
}

void gp_output_fail_after(int writes)
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
		gp_diag_fail(diag, GP_MSG_INTERNAL, NULL,
			     "output name '%s' is not a plain file name", name);
		return NULL;
	}
	for (size_t i = 0; i < set->count; i++)
		if (strcmp(set->files[i].name, name) == 0) {
			gp_diag_fail(diag, GP_MSG_INTERNAL, NULL,
				     "output '%s' written twice",
				     name);
			return NULL;
		}
	if (!gp_array_reserve(set->files, set->capacity, set->count + 1))
		goto oom;
	struct gp_output_file *file = &set->files[set->count];
	file->name = strdup(name);
	if (!file->name)
		goto oom;
	gp_buffer_init(&file->content);
	set->count++;
	return &file->content;
oom:
	gp_diag_oom(diag, NULL);
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
		step();
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
		gp_diag_oom(diag, NULL);
		return NULL;
	}
	sprintf(path, "%s/.%s.XXXXXX", folder, file->name);
	int fd = mkstemp(path);
	if (fd < 0) {
		gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
			     "%s: cannot write in this folder: %s",
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
		gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
			     "%s/%s: cannot write: %s", folder,
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
		return gp_diag_fail(diag, GP_MSG_NOT_A_FOLDER, NULL,
				    "%s: exists and is not a folder", folder);
	}
	if (mkdir(folder, 0777) == 0) {
		*created = true;
		return true;
	}
	return gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
			    "%s: cannot create the folder: %s",
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
			return gp_diag_oom(diag, NULL);
		if (in_way)
			return gp_diag_fail(diag, GP_MSG_IN_THE_WAY, NULL,
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

void gp_output_fail_rename_after(int renames)
{
	fail_renames = renames;
}

static int do_rename(const char *from, const char *to)
{
	if (fail_renames > 0 && --fail_renames == 0) {
		errno = EIO;
		return -1;
	}
	step();
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
		gp_diag_oom(diag, NULL);
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
			return gp_diag_fail(diag, GP_MSG_CANNOT_RENAME, NULL,
					    "%s/%s: cannot rename "
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

/* The fallback: every file renamed into place in the folder itself.  A
 * failure still rolls back, but a kill between two renames leaves a mix. */
static bool commit_in_place(const struct gp_output_set *set,
			    const char *folder, struct gp_diag *diag)
{
	bool created;
	if (!make_folder(folder, &created, diag))
		return false;
	struct commit_entry *entries = calloc(set->count ? set->count : 1,
					      sizeof(*entries));
	bool ok = entries && check_targets(set, folder, diag);
	if (!entries)
		gp_diag_oom(diag, NULL);
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

/* --- the whole folder swapped in with one rename ------------------------- */

static int commit_mode;  /* test hook: GP_OUTPUT_COMMIT_* */

void gp_output_commit_mode(int mode)
{
	commit_mode = mode;
}

/* Where the folder really is: its parent opened, and its own name there. */
struct place {
	int parent;               /* fd of the parent folder, locked */
	char *base;               /* the folder's name in it */
	bool exists;
	struct stat st;           /* of the folder, when it exists */
};

static bool is_temporary_of(const char *entry, const char *base,
			    const char *kind)
{
	size_t n = strlen(base);
	return entry[0] == '.' && strncmp(entry + 1, base, n) == 0 &&
	       strncmp(entry + 1 + n, kind, strlen(kind)) == 0;
}

/* The parent's path and the last name of folder, links followed. */
static bool split_folder(const char *folder, char **parent, char **base)
{
	char *real = realpath(folder, NULL);
	char *copy = strdup(real ? real : folder);
	free(real);
	if (!copy)
		return false;
	size_t n = strlen(copy);
	while (n > 1 && copy[n - 1] == '/')
		copy[--n] = '\0';
	char *slash = strrchr(copy, '/');
	const char *name = slash ? slash + 1 : copy;
	if (slash == copy)
		*parent = strdup("/");
	else if (slash)
		*parent = strndup(copy, (size_t)(slash - copy));
	else
		*parent = strdup(".");
	*base = strdup(name);
	free(copy);
	bool plain = *parent && *base && **base && strcmp(*base, ".") &&
		     strcmp(*base, "..");
	if (!plain) {
		free(*parent);
		free(*base);
	}
	return plain;
}

/* Removes the files of a folder of ours and the folder; never goes into
 * a subfolder (one that appeared there is left, with the folder). */
static void remove_files_at(int parent, const char *name)
{
	int fd = openat(parent, name, O_RDONLY | O_DIRECTORY | O_NOFOLLOW |
					      O_CLOEXEC);
	DIR *dir = fd >= 0 ? fdopendir(fd) : NULL;
	if (!dir) {
		if (fd >= 0)
			close(fd);
		return;
	}
	for (struct dirent *e; (e = readdir(dir));) {
		if (!strcmp(e->d_name, ".") || !strcmp(e->d_name, ".."))
			continue;
		step();
		unlinkat(fd, e->d_name, 0);
	}
	closedir(dir);
	step();
	unlinkat(parent, name, AT_REMOVEDIR);
}

/* Temporaries of runs killed earlier (the lock says they are not
 * running): siblings are removed, and if a run was killed between the two
 * renames of the fallback swap, the old folder is put back first. */
static void clear_stale(struct place *pl)
{
	int fd = dup(pl->parent);
	DIR *dir = fd >= 0 ? fdopendir(fd) : NULL;
	if (!dir) {
		if (fd >= 0)
			close(fd);
		return;
	}
	rewinddir(dir); /* the copy shares the offset */
	char *names[64];
	size_t count = 0;
	for (struct dirent *e; (e = readdir(dir)) && count < 64;)
		if (is_temporary_of(e->d_name, pl->base, ".gp-"))
			names[count++] = strdup(e->d_name);
	closedir(dir);
	for (size_t i = 0; i < count; i++) {
		if (!names[i])
			continue;
		if (!pl->exists &&
		    is_temporary_of(names[i], pl->base, ".gp-old-")) {
			step();
			if (renameat(pl->parent, names[i], pl->parent,
				     pl->base) == 0) {
				pl->exists = fstatat(pl->parent, pl->base,
						     &pl->st, 0) == 0;
				free(names[i]);
				continue;
			}
		}
		remove_files_at(pl->parent, names[i]);
		free(names[i]);
	}
}

/* Removes in-folder temporaries of killed runs of the fallback. */
static void clear_stale_inside(const struct gp_output_set *set, int fd)
{
	int copy = dup(fd);
	DIR *dir = copy >= 0 ? fdopendir(copy) : NULL;
	if (!dir) {
		if (copy >= 0)
			close(copy);
		return;
	}
	rewinddir(dir); /* the copy shares the offset */
	for (struct dirent *e; (e = readdir(dir));)
		for (size_t i = 0; i < set->count; i++)
			if (is_temporary_of(e->d_name, set->files[i].name, ".")) {
				step();
				unlinkat(fd, e->d_name, 0);
				break;
			}
	closedir(dir);
}

static bool is_output(const struct gp_output_set *set, const char *name)
{
	for (size_t i = 0; i < set->count; i++)
		if (!strcmp(set->files[i].name, name) ||
		    is_temporary_of(name, set->files[i].name, "."))
			return true;
	return false;
}

/* Hard-links every entry of the old folder that is not an output into
 * the new one.  -1 when that cannot be done here (a subfolder, no hard
 * links): then the caller falls back. */
static int carry_over(const struct gp_output_set *set, int from, int to)
{
	int copy = dup(from);
	DIR *dir = copy >= 0 ? fdopendir(copy) : NULL;
	if (!dir) {
		if (copy >= 0)
			close(copy);
		return -1;
	}
	rewinddir(dir); /* the copy shares the offset */
	int result = 1;
	for (struct dirent *e; result > 0 && (e = readdir(dir));) {
		if (!strcmp(e->d_name, ".") || !strcmp(e->d_name, "..") ||
		    is_output(set, e->d_name))
			continue;
		struct stat st;
		if (fstatat(from, e->d_name, &st, AT_SYMLINK_NOFOLLOW) != 0 ||
		    S_ISDIR(st.st_mode))
			result = -1;
		else if ((step(), linkat(from, e->d_name, to, e->d_name, 0)))
			result = -1;
	}
	closedir(dir);
	return result;
}

static bool write_at(int folder_fd, const char *folder,
		     const struct gp_output_file *file, struct gp_diag *diag)
{
	step();
	int fd = openat(folder_fd, file->name,
			O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0644);
	if (fd < 0)
		return gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
				    "%s/%s: cannot write: %s",
				    folder, file->name, strerror(errno));
	bool ok = !file->content.failed &&
		  write_all(fd, file->content.data ? file->content.data : "",
			    file->content.size) &&
		  (step(), fchmod(fd, 0644) == 0) && (step(), fsync(fd) == 0);
	int saved = errno;
	ok = close(fd) == 0 && ok;
	if (!ok)
		return gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
				    "%s/%s: cannot write: %s",
				    folder, file->name,
				    file->content.failed ? "out of memory"
							 : strerror(saved ? saved
									  : errno));
	return true;
}

/* Makes a fresh sibling folder ".BASE.gp-KIND-PID-N"; returns its name. */
static char *make_sibling(const struct place *pl, const char *kind)
{
	size_t size = strlen(pl->base) + 64;
	char *name = malloc(size);
	for (int n = 0; name && n < 1000; n++) {
		snprintf(name, size, ".%s.gp-%s-%ld-%d", pl->base, kind,
			 (long)getpid(), n);
		if (!strcmp(kind, "old"))
			return name; /* only a name: renamed to */
		step();
		if (mkdirat(pl->parent, name, 0777) == 0)
			return name;
		if (errno != EEXIST)
			break;
	}
	free(name);
	return NULL;
}

/* Puts the new folder in place: one exchange, or (where the kernel or the
 * file system has no RENAME_EXCHANGE) the old folder renamed aside and the
 * new one renamed in, a window in which the folder is missing and which
 * the next run repairs.  *old receives where the old folder went. */
static bool swap_in(struct place *pl, const char *fresh, char **old)
{
	if (fail_renames > 0 && --fail_renames == 0) {
		errno = EIO;
		return false;
	}
	step();
	if (!pl->exists)
		return renameat(pl->parent, fresh, pl->parent, pl->base) == 0;
	if (commit_mode != GP_OUTPUT_COMMIT_RENAMES &&
	    renameat2(pl->parent, fresh, pl->parent, pl->base,
		      RENAME_EXCHANGE) == 0) {
		*old = strdup(fresh);
		return true;
	}
	if (commit_mode == GP_OUTPUT_COMMIT_EXCHANGE)
		return false;
	*old = make_sibling(pl, "old");
	if (!*old || renameat(pl->parent, pl->base, pl->parent, *old) != 0)
		return false;
	step();
	if (renameat(pl->parent, fresh, pl->parent, pl->base) == 0)
		return true;
	int saved = errno;
	renameat(pl->parent, *old, pl->parent, pl->base);
	errno = saved;
	return false;
}

/* 1 committed, 0 failed (recorded), -1 this folder cannot be swapped. */
static int swap_commit(const struct gp_output_set *set, struct place *pl,
		       const char *folder, struct gp_diag *diag)
{
	int old_fd = -1, new_fd = -1, result = 0;
	char *fresh = NULL, *old = NULL;
	if (pl->exists) {
		old_fd = openat(pl->parent, pl->base,
				O_RDONLY | O_DIRECTORY | O_CLOEXEC);
		if (old_fd < 0 || faccessat(pl->parent, pl->base, W_OK, 0) != 0)
			goto fallback;
		clear_stale_inside(set, old_fd);
	}
	fresh = make_sibling(pl, "new");
	new_fd = fresh ? openat(pl->parent, fresh,
				O_RDONLY | O_DIRECTORY | O_CLOEXEC) : -1;
	if (new_fd < 0)
		goto fallback;
	if (pl->exists) {
		if (carry_over(set, old_fd, new_fd) < 0)
			goto fallback;
		step();
		fchmod(new_fd, pl->st.st_mode & 07777);
	}
	for (size_t i = 0; i < set->count; i++)
		if (!write_at(new_fd, folder, &set->files[i], diag))
			goto out;
	step();
	if (fsync(new_fd) != 0) {
		gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
			     "%s: cannot write: %s", folder,
			     strerror(errno));
		goto out;
	}
	if (!swap_in(pl, fresh, &old)) {
		if (commit_mode == 0 && pl->exists && errno != EIO)
			goto fallback; /* not on this file system */
		gp_diag_fail(diag, GP_MSG_CANNOT_RENAME, NULL,
			     "%s: cannot rename into place: %s",
			     folder, strerror(errno));
		goto out;
	}
	free(fresh);
	fresh = NULL;
	step();
	fsync(pl->parent);
	if (old)
		remove_files_at(pl->parent, old);
	result = 1;
	goto out;
fallback:
	result = -1;
out:
	if (fresh)
		remove_files_at(pl->parent, fresh);
	if (old_fd >= 0)
		close(old_fd);
	if (new_fd >= 0)
		close(new_fd);
	free(fresh);
	free(old);
	return result;
}

bool gp_output_commit(const struct gp_output_set *set, const char *folder,
		      struct gp_diag *diag)
{
	steps = 0;
	struct place pl = { -1, NULL, false, { 0 } };
	char *parent = NULL;
	if (stat(folder, &pl.st) == 0 && !S_ISDIR(pl.st.st_mode))
		return gp_diag_fail(diag, GP_MSG_NOT_A_FOLDER, NULL,
				    "%s: exists and is not a folder", folder);
	if (!check_targets(set, folder, diag))
		return false;
	int result = -1;
	if (commit_mode != GP_OUTPUT_COMMIT_IN_PLACE &&
	    split_folder(folder, &parent, &pl.base)) {
		pl.parent = open(parent, O_RDONLY | O_DIRECTORY | O_CLOEXEC);
		/* one commit at a time next to this folder, so that the
		 * temporaries found are those of killed runs */
		if (pl.parent >= 0 && flock(pl.parent, LOCK_EX) == 0) {
			pl.exists = fstatat(pl.parent, pl.base, &pl.st, 0) == 0;
			if (!pl.exists || S_ISDIR(pl.st.st_mode)) {
				clear_stale(&pl);
				result = swap_commit(set, &pl, folder, diag);
			}
		}
	}
	bool ok = result > 0;
	if (result < 0)
		ok = commit_in_place(set, folder, diag);
	if (pl.parent >= 0)
		close(pl.parent); /* and unlocks */
	free(parent);
	free(pl.base);
	return ok;
}
