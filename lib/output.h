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
/* Creates folder if missing (one level), writes every file atomically. */
bool gp_output_commit(const struct gp_output_set *set, const char *folder,
		      struct gp_diag *diag);

/* Test hook: make the n-th low-level write of a commit fail (1-based;
 * 0 turns it off).  Used to prove that failures leave no partial files. */
GP_EXPORT void gp_output_fail_after(int writes);

#endif
