/* Stand-in for the number of commons until the model provides it: counts
 * the dot rows of the dot-matrix blocks (one common per dot row per block
 * line; a block that reuses another block's commons adds none).  Digits
 * and icons add theirs once they exist.  Remove this file when model.c
 * defines gp_design_common_count. */
#include "model.h"

#include <limits.h>

int gp_design_common_count(const struct gp_design *design)
{
	long long total = 0;
	for (size_t i = 0; i < design->block_count; i++) {
		const struct gp_block *block = &design->blocks[i];
		if (block->commons_from >= 0)
			continue;
		total += (long long)block->lines * block->dots_down;
		if (total > INT_MAX)
			return INT_MAX;
	}
	total += gp_icons_common_count(design);
	return total > INT_MAX ? INT_MAX : (int)total;
}
