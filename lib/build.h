/* The build: one design laid out, routed and checked.  Each stage reads the
 * design and what earlier stages put here, and adds its own results. */
#ifndef GP_BUILD_H
#define GP_BUILD_H

#include "artwork.h"
#include "buffer.h"
#include "diag.h"
#include "model.h"
#include "output.h"

struct gp_block_nets {
	int first_common;         /* net index of the block's first common */
	int first_segment;        /* net index of the block's first segment */
	long common_count;
	long segment_count;
};

struct gp_build {
	const struct gp_design *design;
	struct gp_artwork art;
	struct gp_block_nets *blocks;   /* one per design block */
	struct gp_buffer summary;
	/* Lines for the summary added by stages ("font: ..."), newline-ended. */
	struct gp_buffer notes;
};

/* Lays out every dot-matrix block: nets, electrode strips, pixels. */
bool gp_blocks_layout(struct gp_build *build, struct gp_diag *diag);

/* Net index of a block's common for dot row `row` (0-based over the whole
 * block, line by line), or -1 if out of range. */
int gp_block_common_net(const struct gp_build *build, size_t block, long row);

/* Renders every output of the build into set, in memory, touching no
 * file: gp_build_write is this followed by gp_output_commit.  The fuzz
 * harness and tests use it to run the whole pipeline without a disk. */
bool gp_build_outputs(const struct gp_build *build,
		      struct gp_output_set *set, struct gp_diag *diag);

/* Cut outlines of both plates. */
bool gp_outlines_layout(struct gp_build *build, struct gp_diag *diag);

#endif
