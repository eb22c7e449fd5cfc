/* A set of output files built in memory and put in place all together:
 * each is written under a temporary name in the output folder, synced, and
 * only when every one is complete are they renamed over their final
 * names.  A failed run leaves the folder as it was. */
#ifndef GP_OUTPUT_H
#define GP_OUTPUT_H

#include "buffer.h"
#include "diag.h"

struct gp_output_file {
	char *name;               /* plain file name, no folder part */
	struct gp_buffer content;
};

struct gp_output_set {
	struct gp_output_file *files;
	size_t count;
	size_t capacity;
};

void gp_output_set_init(struct gp_output_set *set);
void gp_output_set_finish(struct gp_output_set *set);
/* Returns the new file's buffer to write into, or NULL on a bad name
 * (records why) or out of memory. */
struct gp_buffer *gp_output_add(struct gp_output_set *set, const char *name,
				struct gp_diag *diag);
/* Creates folder if missing (one level), writes every file atomically:
 * all under temporary names first, then renamed into place; if a rename
 * fails, the files already renamed are rolled back (the previous ones
 * were kept as hard links until the end).  On failure the folder is as it
 * was, and a folder this call created is removed again.  folder itself
 * may be a symbolic link (the caller named it); names in set are plain,
 * so nothing is written outside it, and a symbolic link in the folder
 * with an output's name is replaced, never followed. */
bool gp_output_commit(const struct gp_output_set *set, const char *folder,
		      struct gp_diag *diag);

/* Test hook: make the n-th low-level write of a commit fail (1-based;
 * 0 turns it off).  Used to prove that failures leave no partial files. */
GP_EXPORT void gp_output_fail_after(int writes);
/* Test hook: make the n-th rename of a commit fail (1-based; 0 off). */
GP_EXPORT void gp_output_fail_rename_after(int renames);

#endif
