/* Dot-matrix blocks: reading and checking the 'blocks' section, and the
 * dot arithmetic every stage uses (the layout is lib/layout/matrix.c). */
#include "model.h"

#include "units.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* The dot arithmetic below is a count (at most GP_MAX_CELLS cells or
 * lines, 256 dots) times a length (at most GP_LENGTH_MAX) plus an origin:
 * it cannot overflow int64_t. */
_Static_assert((INT64_MAX - 2 * GP_LENGTH_MAX) / GP_LENGTH_MAX >
		       (int64_t)GP_MAX_CELLS + 256,
	       "block coordinates could overflow int64_t");

struct gp_point gp_block_dot(const struct gp_block *b, long line, long cell,
			     long row, long col)
{
	struct gp_point p = {
		b->origin.x + cell * b->cell_pitch + col * b->dot_pitch_x,
		b->origin.y - line * b->line_pitch - row * b->dot_pitch_y,
	};
	return p;
}

static int64_t cell_width(const struct gp_block *b)
{
	return (b->dots_across - 1) * b->dot_pitch_x + b->dot_width;
}

int64_t gp_block_cell_height(const struct gp_block *b)
{
	return (b->dots_down - 1) * b->dot_pitch_y + b->dot_height;
}

struct gp_box gp_block_extent(const struct gp_block *b)
{
	struct gp_point last = gp_block_dot(b, b->lines - 1, b->cells - 1,
					    b->dots_down - 1,
					    b->dots_across - 1);
	return gp_box_make(b->origin.x, b->origin.y, last.x + b->dot_width,
			   last.y - b->dot_height);
}

/* --- reading ------------------------------------------------------------- */

static bool read_dot_pitch(struct gp_reader *r, struct gp_block *b)
{
	int64_t pitch[2] = { 0, 0 }, gap[2] = { -1, -1 };
	const struct gp_node *pitch_node = gp_read_node(r, "dot_pitch", false);
	const struct gp_node *gap_node = gp_read_node(r, "dot_gap", false);
	if (pitch_node && gap_node)
		return gp_diag_fail(r->diag, GP_MSG_EXCLUSIVE_KEYS,
				    &gap_node->where,
				    "give either 'dot_pitch' or 'dot_gap' "
				    "in %s, not both",
				    r->what);
	if (!pitch_node && !gap_node)
		return gp_diag_fail(r->diag, GP_MSG_MISSING_ONE_OF,
				    &r->map->where,
				    "missing required key 'dot_pitch' (or "
				    "'dot_gap') in %s",
				    r->what);
	if (pitch_node) {
		if (!gp_read_size_pair(r, "dot_pitch", true, pitch))
			return false;
		b->dot_pitch_x = pitch[0];
		b->dot_pitch_y = pitch[1];
	} else {
		if (!gp_read_pair(r, "dot_gap", true, gap))
			return false;
		if (gap[0] < 0 || gap[1] < 0)
			return gp_diag_fail(r->diag, GP_MSG_OUT_OF_RANGE,
					    &gap_node->where,
					    "'dot_gap' must not be negative");
		b->dot_pitch_x = b->dot_width + gap[0];
		b->dot_pitch_y = b->dot_height + gap[1];
	}
	return true;
}

static bool read_counts(struct gp_reader *r, struct gp_block *b)
{
	long cells[2] = { 1, 1 }, dots[2] = { 1, 1 };
	bool ok = gp_read_int_pair(r, "cells", true, 1, GP_MAX_CELLS, cells);
	ok &= gp_read_int_pair(r, "dots", true, 1, 256, dots);
	b->cells = cells[0];
	b->lines = cells[1];
	b->dots_across = dots[0];
	b->dots_down = dots[1];
	if (ok && b->cells * b->lines > GP_MAX_CELLS)
		return gp_diag_fail(r->diag, GP_MSG_OVER_LIMIT, &r->map->where,
				    "%s has %ld cells; the limit is %d",
				    r->what, b->cells * b->lines, GP_MAX_CELLS);
	if (ok && b->dots_across * b->dots_down > GP_MAX_DOTS_PER_CELL)
		return gp_diag_fail(r->diag, GP_MSG_OVER_LIMIT, &r->map->where,
				    "%s has %ld dots per cell; the limit is "
				    "%d",
				    r->what, b->dots_across * b->dots_down,
				    GP_MAX_DOTS_PER_CELL);
	return ok;
}

static bool read_block(struct gp_block *b, const char *name,
		       const struct gp_node *node, struct gp_diag *diag)
{
	char what[160];
	snprintf(what, sizeof(what), "block '%s'", name);
	struct gp_reader r;
	int64_t origin[2] = { 0, 0 }, dot_size[2] = { 0, 0 };
	memset(b, 0, sizeof(*b));
	b->name = name;
	b->where = node->where;
	b->commons_from = -1;
	b->share_segments = true;
	gp_reader_begin(&r, node, what, diag);
	if (!r.map)
		return gp_reader_end(&r);
	bool ok = gp_read_pair(&r, "origin", true, origin);
	ok &= read_counts(&r, b);
	ok &= gp_read_size_pair(&r, "dot_size", true, dot_size);
	b->dot_width = dot_size[0];
	b->dot_height = dot_size[1];
	ok = read_dot_pitch(&r, b) && ok;
	b->cell_pitch = b->line_pitch = 0;
	ok &= gp_read_size(&r, "cell_pitch", b->cells > 1, &b->cell_pitch);
	ok &= gp_read_size(&r, "line_pitch", b->lines > 1, &b->line_pitch);
	ok &= gp_read_bool(&r, "share_segments", false, &b->share_segments);
	const struct gp_node *from = gp_read_node(&r, "share_commons_with",
						  false);
	if (from) {
		ok &= gp_node_expect_scalar(from, diag);
		b->commons_from_where = from->where;
	}
	b->origin = (struct gp_point){ origin[0], origin[1] };
	return gp_reader_end(&r) && ok;
}

static bool check_block(const struct gp_block *b, struct gp_diag *diag)
{
	char a[32], c[32];
	if (b->dot_width > b->dot_pitch_x || b->dot_height > b->dot_pitch_y) {
		bool across = b->dot_width > b->dot_pitch_x;
		gp_format_mm_short(a, sizeof(a),
				   across ? b->dot_width : b->dot_height);
		gp_format_mm_short(c, sizeof(c),
				   across ? b->dot_pitch_x : b->dot_pitch_y);
		return gp_diag_fail(diag, GP_MSG_TOO_LARGE, &b->where,
				    "block '%s': dot %s %s mm is larger "
				    "than the dot pitch %s mm",
				    b->name, across ? "width" : "height", a, c);
	}
	if (b->cells > 1 && cell_width(b) >= b->cell_pitch) {
		gp_format_mm_short(a, sizeof(a), cell_width(b));
		gp_format_mm_short(c, sizeof(c), b->cell_pitch);
		return gp_diag_fail(diag, GP_MSG_TOO_LARGE, &b->where,
				    "block '%s': a cell is %s mm wide but "
				    "the cell pitch is %s mm; cells would "
				    "touch (expected a pitch larger than "
				    "the cell)",
				    b->name, a, c);
	}
	if (b->lines > 1 && gp_block_cell_height(b) >= b->line_pitch) {
		gp_format_mm_short(a, sizeof(a), gp_block_cell_height(b));
		gp_format_mm_short(c, sizeof(c), b->line_pitch);
		return gp_diag_fail(diag, GP_MSG_TOO_LARGE, &b->where,
				    "block '%s': a cell is %s mm high but "
				    "the line pitch is %s mm; lines would "
				    "touch (expected a pitch larger than "
				    "the cell)",
				    b->name, a, c);
	}
	return true;
}

/* The block must lie where both plates are. */
static bool check_fits(const struct gp_design *design,
		       const struct gp_block *b, struct gp_diag *diag)
{
	struct gp_box f = design->front.box, k = design->back.box;
	struct gp_box both = {
		f.x0 > k.x0 ? f.x0 : k.x0, f.y0 > k.y0 ? f.y0 : k.y0,
		f.x1 < k.x1 ? f.x1 : k.x1, f.y1 < k.y1 ? f.y1 : k.y1,
	};
	struct gp_box e = gp_block_extent(b);
	if (e.x0 >= both.x0 && e.x1 <= both.x1 && e.y0 >= both.y0 &&
	    e.y1 <= both.y1)
		return true;
	char x0[32], y0[32], x1[32], y1[32];
	gp_format_mm_short(x0, sizeof(x0), e.x0);
	gp_format_mm_short(y0, sizeof(y0), e.y0);
	gp_format_mm_short(x1, sizeof(x1), e.x1);
	gp_format_mm_short(y1, sizeof(y1), e.y1);
	return gp_diag_fail(diag, GP_MSG_OUTSIDE_OVERLAP, &b->where,
			    "block '%s' spans x %s..%s, y %s..%s mm, which "
			    "does not fit where the two plates overlap",
			    b->name, x0, x1, y0, y1);
}

static int find_block(const struct gp_design *design, size_t before,
		      const char *name)
{
	for (size_t i = 0; i < before; i++)
		if (strcmp(design->blocks[i].name, name) == 0)
			return (int)i;
	return -1;
}

/* A block that reuses another's commons must have its rows on them. */
static bool resolve_shared_commons(struct gp_design *design, size_t index,
				   const struct gp_node *from,
				   struct gp_diag *diag)
{
	struct gp_block *b = &design->blocks[index];
	int owner = find_block(design, index, from->text);
	if (owner < 0) {
		const char *names[GP_MAX_BLOCKS];
		for (size_t i = 0; i < design->block_count; i++)
			names[i] = design->blocks[i].name;
		const char *near = gp_nearest_word(from->text, names,
						   design->block_count);
		return gp_diag_fail(diag, GP_MSG_UNKNOWN_NAME, &from->where,
				    "'share_commons_with' names '%s', which "
				    "is not a block given before '%s'%s%s%s",
				    from->text, b->name,
				    near ? "; did you mean '" : "",
				    near ? near : "", near ? "'?" : "");
	}
	const struct gp_block *o = &design->blocks[owner];
	if (o->commons_from >= 0)
		owner = o->commons_from, o = &design->blocks[owner];
	if (o->lines != b->lines || o->dots_down != b->dots_down ||
	    o->origin.y != b->origin.y || o->dot_height != b->dot_height ||
	    o->dot_pitch_y != b->dot_pitch_y ||
	    (b->lines > 1 && o->line_pitch != b->line_pitch))
		return gp_diag_fail(diag, GP_MSG_CANNOT_SHARE, &from->where,
				    "block '%s' cannot share the commons of "
				    "'%s': expected the same origin y, "
				    "lines, dot rows, dot height and pitches "
				    "down",
				    b->name, o->name);
	b->commons_from = owner;
	return true;
}

/* Totals over every block, checked before any layout so that a hostile
 * description cannot make the layout exhaust memory or time. */
static bool check_totals(const struct gp_design *design,
			 const struct gp_node *node, struct gp_diag *diag)
{
	size_t nets = 0, dots = 0;
	for (size_t i = 0; i < design->block_count; i++) {
		const struct gp_block *b = &design->blocks[i];
		long groups = b->share_segments ? 1 : b->lines;
		if (b->commons_from < 0)
			nets += (size_t)(b->lines * b->dots_down);
		nets += (size_t)(groups * b->cells * b->dots_across);
		dots += (size_t)(b->cells * b->lines) *
			(size_t)(b->dots_across * b->dots_down);
	}
	if (nets > GP_MAX_NETS)
		return gp_diag_fail(diag, GP_MSG_OVER_LIMIT, &node->where,
				    "the blocks need %zu commons and "
				    "segments; the limit is %d",
				    nets, GP_MAX_NETS);
	if (dots > GP_MAX_PIXELS)
		return gp_diag_fail(diag, GP_MSG_OVER_LIMIT, &node->where,
				    "the blocks have %zu dots; the limit is "
				    "%d",
				    dots, GP_MAX_PIXELS);
	return true;
}

bool gp_blocks_read(struct gp_design *design, const struct gp_node *node,
		    struct gp_diag *diag)
{
	if (!gp_node_expect_map(node, diag))
		return false;
	if (node->count > GP_MAX_BLOCKS)
		return gp_diag_fail(diag, GP_MSG_OVER_LIMIT, &node->where,
				    "%zu blocks; the limit is %d", node->count,
				    GP_MAX_BLOCKS);
	design->blocks = calloc(node->count ? node->count : 1,
				sizeof(*design->blocks));
	if (!design->blocks)
		return gp_diag_oom(diag, &node->where);
	bool ok = true;
	for (size_t i = 0; i < node->count; i++) {
		struct gp_block *b = &design->blocks[i];
		if (!read_block(b, node->keys[i]->text, node->items[i], diag) ||
		    !check_block(b, diag) ||
		    (design->plates_ok && !check_fits(design, b, diag))) {
			ok = false;
			continue;
		}
		design->block_count = i + 1;
	}
	design->block_count = ok ? node->count : 0;
	for (size_t i = 0; ok && i < node->count; i++) {
		const struct gp_node *item = node->items[i];
		for (size_t k = 0; k < item->count; k++)
			if (strcmp(item->keys[k]->text,
				   "share_commons_with") == 0)
				ok &= resolve_shared_commons(
					design, i, item->items[k], diag);
	}
	return ok && check_totals(design, node, diag);
}
