#include "staged-file.h"

#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* "DIR/.NAME.XXXXXX" for "DIR/NAME", "./.NAME.XXXXXX" for "NAME". */
static char *temporary_name(const char *path)
{
	const char *slash = strrchr(path, '/');
	size_t folder = slash ? (size_t)(slash - path) + 1 : 0;
	char *name = malloc(strlen(path) + 16);
	if (name)
		sprintf(name, "%.*s.%s.XXXXXX", (int)folder, path,
			path + folder);
	return name;
}

static bool write_all(int fd, const char *data, size_t size)
{
	while (size > 0) {
		ssize_t n = write(fd, data, size);
		if (n < 0 && errno == EINTR)
			continue;
		if (n <= 0)
			return false;
		data += n;
		size -= (size_t)n;
	}
	return true;
}

bool gp_staged_file_write(struct gp_staged_file *file, const char *path,
			  const char *data, size_t size, struct gp_diag *diag)
{
	/* a device or a pipe would be replaced by a plain file, not written */
	struct stat st;
	file->path = file->temporary = NULL;
	if (stat(path, &st) == 0 && !S_ISREG(st.st_mode))
		return gp_diag_fail(diag, GP_MSG_NOT_A_PLAIN_FILE, NULL,
				    "%s: not a plain file; "
				    "give the name of a file to write",
				    path);
	file->path = strdup(path);
	file->temporary = temporary_name(path);
	if (!file->path || !file->temporary) {
		gp_staged_file_discard(file);
		return gp_diag_oom(diag, NULL);
	}
	int fd = mkstemp(file->temporary);
	bool ok = fd >= 0 && write_all(fd, data, size) &&
		  fchmod(fd, 0644) == 0 && fsync(fd) == 0;
	int saved = errno;
	if (fd >= 0)
		ok = close(fd) == 0 && ok;
	if (!ok) {
		gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
			     "%s: cannot write it: %s", path,
			     strerror(saved ? saved : errno));
		if (fd < 0) {
			free(file->temporary);
			file->temporary = NULL;
		}
		gp_staged_file_discard(file);
	}
	return ok;
}

bool gp_staged_file_commit(struct gp_staged_file *file, struct gp_diag *diag)
{
	bool ok = rename(file->temporary, file->path) == 0;
	if (!ok)
		gp_diag_fail(diag, GP_MSG_CANNOT_RENAME, NULL,
			     "%s: cannot put it in place: %s",
			     file->path, strerror(errno));
	else {
		free(file->temporary);
		file->temporary = NULL;
	}
	gp_staged_file_discard(file);
	return ok;
}

void gp_staged_file_discard(struct gp_staged_file *file)
{
	if (file->temporary)
		unlink(file->temporary);
	free(file->temporary);
	free(file->path);
	file->temporary = NULL;
	file->path = NULL;
}
