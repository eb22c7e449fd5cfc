/* Dot-matrix blocks: laying out (read by lib/load/blocks-read.c).
 *
 * Commons run along dot rows (one per dot row per line of cells) on the
 * common plate; segments run along dot columns on the segment plate.  Each
 * strip is as wide as the dots, so a common and a segment overlap exactly
 * on one dot: the intended pixels are the nominal dot rectangles.  Strips
 * run on past the outermost dots by the registration margin so that a
 * plate shift does not clip the edge dots. */
#include "layout.h"

#include "units.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* --- layout ---------------------------------------------------------------- */

/* How far strips run past the outermost dots: the registration margin,
 * but never so far that two strips of different nets come closer than the
 * minimum space across a gap between lines. */
static int64_t line_overrun(const struct gp_design *design,
			    const struct gp_block *b)
{
	int64_t margin = design->rules.registration;
	if (b->lines > 1 && !b->share_segments) {
		int64_t room = (b->line_pitch - gp_block_cell_height(b) -
				design->rules.min_space) / 2;
		if (room < margin)
			margin = room > 0 ? room : 0;
	}
	return margin;
}

/* x range of common strips: the block and every block that shares them. */
static void common_span(const struct gp_design *design, size_t owner,
			int64_t *x0, int64_t *x1)
{
	*x0 = INT64_MAX;
	*x1 = INT64_MIN;
	for (size_t i = 0; i < design->block_count; i++) {
		const struct gp_block *b = &design->blocks[i];
		if (i != owner && b->commons_from != (int)owner)
			continue;
		struct gp_box e = gp_block_extent(b);
		*x0 = e.x0 < *x0 ? e.x0 : *x0;
		*x1 = e.x1 > *x1 ? e.x1 : *x1;
	}
	*x0 -= design->rules.registration;
	*x1 += design->rules.registration;
}

static bool add_commons(struct gp_build *build, size_t index,
			struct gp_diag *diag)
{
	const struct gp_design *design = build->design;
	const struct gp_block *b = &design->blocks[index];
	struct gp_block_nets *nets = &build->blocks[index];
	enum gp_plate plate = gp_common_plate(design);
	nets->common_count = b->lines * b->dots_down;
	if (b->commons_from >= 0) {
		nets->first_common = build->blocks[b->commons_from].first_common;
		return true;
	}
	int64_t x0, x1;
	common_span(design, index, &x0, &x1);
	nets->first_common = (int)build->art.net_count;
	for (long line = 0; line < b->lines; line++) {
		for (long row = 0; row < b->dots_down; row++) {
			int net = gp_artwork_add_net(&build->art, GP_NET_COMMON,
						     plate);
			struct gp_point top = gp_block_dot(b, line, 0, row, 0);
			struct gp_box box = gp_box_make(x0, top.y, x1,
							top.y - b->dot_height);
			if (net < 0 ||
			    !gp_artwork_add_box(&build->art,
						gp_plate_ito_layer(plate),
						GP_ROLE_ELECTRODE, net, box))
				return gp_diag_oom(diag, &b->where);
		}
	}
	return true;
}

/* One segment strip for column col of cell, spanning lines first..last. */
static bool add_segment(struct gp_build *build, const struct gp_block *b,
			long first, long last, long cell, long col)
{
	enum gp_plate plate = build->design->segment_plate;
	int64_t overrun = line_overrun(build->design, b);
	struct gp_point top = gp_block_dot(b, first, cell, 0, col);
	struct gp_point bottom = gp_block_dot(b, last, cell, b->dots_down - 1,
					      col);
	struct gp_box box = gp_box_make(top.x, top.y + overrun,
					top.x + b->dot_width,
					bottom.y - b->dot_height - overrun);
	int net = gp_artwork_add_net(&build->art, GP_NET_SEGMENT, plate);
	return net >= 0 && gp_artwork_add_box(&build->art,
					      gp_plate_ito_layer(plate),
					      GP_ROLE_ELECTRODE, net, box);
}

static bool add_segments(struct gp_build *build, size_t index,
			 struct gp_diag *diag)
{
	const struct gp_block *b = &build->design->blocks[index];
	struct gp_block_nets *nets = &build->blocks[index];
	long groups = b->share_segments ? 1 : b->lines;
	long span = b->share_segments ? b->lines : 1;
	nets->first_segment = (int)build->art.net_count;
	nets->segment_count = groups * b->cells * b->dots_across;
	for (long g = 0; g < groups; g++)
		for (long cell = 0; cell < b->cells; cell++)
			for (long col = 0; col < b->dots_across; col++)
				if (!add_segment(build, b, g * span,
						 g * span + span - 1, cell,
						 col))
					return gp_diag_oom(diag, &b->where);
	return true;
}

/* Net index of segment for (line, cell, col). */
static int segment_net(const struct gp_block *b,
		       const struct gp_block_nets *nets, long line, long cell,
		       long col)
{
	long group = b->share_segments ? 0 : line;
	return nets->first_segment +
	       (int)((group * b->cells + cell) * b->dots_across + col);
}

static bool add_pixels(struct gp_build *build, size_t index,
		       struct gp_diag *diag)
{
	const struct gp_block *b = &build->design->blocks[index];
	const struct gp_block_nets *nets = &build->blocks[index];
	for (long line = 0; line < b->lines; line++)
	for (long cell = 0; cell < b->cells; cell++)
	for (long row = 0; row < b->dots_down; row++)
	for (long col = 0; col < b->dots_across; col++) {
		struct gp_point p = gp_block_dot(b, line, cell, row, col);
		struct gp_box box = gp_box_make(p.x, p.y, p.x + b->dot_width,
						p.y - b->dot_height);
		int common = nets->first_common +
			     (int)(line * b->dots_down + row);
		struct gp_pixel *pixel = gp_artwork_add_pixel(
			&build->art, common,
			segment_net(b, nets, line, cell, col), box);
		if (!pixel)
			return gp_diag_oom(diag, &b->where);
		pixel->owner_kind = GP_OWNER_BLOCK;
		pixel->owner = (int)index;
		pixel->a = (int)line;
		pixel->b = (int)cell;
		pixel->c = (int)row;
		pixel->d = (int)col;
	}
	return true;
}

static size_t pixel_total(const struct gp_design *design)
{
	size_t total = 0;
	for (size_t i = 0; i < design->block_count; i++) {
		const struct gp_block *b = &design->blocks[i];
		total += (size_t)(b->cells * b->lines) *
			 (size_t)(b->dots_across * b->dots_down);
	}
	return total;
}

bool gp_blocks_layout(struct gp_build *build, struct gp_diag *diag)
{
	const struct gp_design *design = build->design;
	if (pixel_total(design) > GP_MAX_PIXELS)
		return gp_diag_fail(diag, GP_MSG_OVER_LIMIT, NULL,
				    "%s: the blocks have %zu dots; the limit "
				    "is %d",
				    design->spec->file, pixel_total(design),
				    GP_MAX_PIXELS);
	build->blocks = calloc(design->block_count ? design->block_count : 1,
			       sizeof(*build->blocks));
	if (!build->blocks)
		return gp_diag_oom(diag, NULL);
	for (size_t i = 0; i < design->block_count; i++)
		if (!add_commons(build, i, diag))
			return false;
	for (size_t i = 0; i < design->block_count; i++)
		if (!add_segments(build, i, diag) ||
		    !add_pixels(build, i, diag))
			return false;
	return true;
}

int gp_block_common_net(const struct gp_build *build, size_t block, long row)
{
	if (block >= build->design->block_count || row < 0 ||
	    row >= build->blocks[block].common_count)
		return -1;
	return build->blocks[block].first_common + (int)row;
}
