/* A set of output files built in memory and put in place all together:
 * written into a fresh folder beside the output folder, synced, and
 * swapped in with one rename.  A failed or killed run leaves the folder
 * as it was. */
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
/* Creates folder if missing (one level) and replaces it at once by one
 * holding the set and its other files (hard links), with
 * renameat2(RENAME_EXCHANGE); without it, by two renames; where no
 * sibling folder can be made or folder holds a subfolder, file by file
 * in the folder: all under temporary names first, then renamed into
 * place, and if a rename fails, the files already renamed are rolled back
 * (the previous ones were kept as hard links until the end).  Clears
 * what killed commits left (commits beside one folder take turns, by a
 * lock on its parent).  On failure the folder is as it was, and a folder
 * this call created is removed again.  folder itself
 * may be a symbolic link (the caller named it); names in set are plain,
 * so nothing is written outside it, and a symbolic link in the folder
 * with an output's name is replaced, never followed. */
bool gp_output_commit(const struct gp_output_set *set, const char *folder,
		      struct gp_diag *diag);

/* Test hook: make the n-th low-level write of a commit fail (1-based;
 * 0 turns it off).  Used to prove that failures leave no partial files. */
void gp_output_fail_after(int writes);
/* Test hook: make the n-th rename of a commit fail (1-based; 0 off). */
void gp_output_fail_rename_after(int renames);

/* Test hook: kill the process (SIGKILL) just before the n-th change a
 * commit makes on the disk (1-based; 0 off). */
void gp_output_kill_at(int step);

/* Test hook: how gp_output_commit puts the set in place. */
enum {
	GP_OUTPUT_COMMIT_AUTO,      /* exchange, else renames, else in place */
	GP_OUTPUT_COMMIT_EXCHANGE,  /* the new folder swapped in at once */
	GP_OUTPUT_COMMIT_RENAMES,   /* old folder renamed aside, new one in */
	GP_OUTPUT_COMMIT_IN_PLACE,  /* file by file in the folder */
};
void gp_output_commit_mode(int mode);

#endif
