/* One file outside an output folder (a dependency file, the picture of a
 * diff) replaced whole: written and synced under a temporary name beside
 * it, then renamed over it, so that a reader sees the old file or the new
 * one and a failure leaves the old one.  Staging first lets a caller fail
 * before it commits anything else. */
#ifndef GP_STAGED_FILE_H
#define GP_STAGED_FILE_H

#include "diag.h"

#include <stdbool.h>
#include <stddef.h>

struct gp_staged_file {
	char *path;
	char *temporary;          /* NULL once committed or discarded */
};

/* Writes data under a temporary name in path's folder; false with a
 * message (naming path) when it cannot, or when path is there and is not
 * a plain file (a device or a pipe would be replaced, not written). */
bool gp_staged_file_write(struct gp_staged_file *file, const char *path,
			  const char *data, size_t size, struct gp_diag *diag);
/* Renames the temporary over path; false with a message. */
bool gp_staged_file_commit(struct gp_staged_file *file, struct gp_diag *diag);
/* Removes the temporary, if any, and frees; safe after commit. */
void gp_staged_file_discard(struct gp_staged_file *file);

#endif
