/* The layout stages of dot-matrix blocks (matrix.c) and icons
 * (icon-layout.c); digits have theirs in digits.h. */
#ifndef GP_LAYOUT_H
#define GP_LAYOUT_H

#include "stage.h"

#include <stdbool.h>
#include <stddef.h>

/* Lays out every dot-matrix block: nets, electrode strips, pixels. */
bool gp_blocks_layout(struct gp_build *build, struct gp_diag *diag);

/* Net index of a block's common for dot row `row` (0-based over the whole
 * block, line by line), or -1 if out of range. */
int gp_block_common_net(const struct gp_build *build, size_t block, long row);

/* Lays out every icon: nets, front electrodes and bridges, back patches
 * and bridges, pixels, summary lines (icon-layout.c). */
bool gp_icons_layout(struct gp_build *build, struct gp_diag *diag);

#endif
