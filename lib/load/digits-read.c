/* The "digits" section: rows of segment digits by name.
 *
 *   digits:
 *     clock:
 *       origin: [x, y]        bottom-left of digit 1's upright outline
 *       count: 4
 *       pitch: 7              digit i at origin + (i - 1) * pitch
 *       segments: 7           7, 14 or 16
 *       height: 8
 *       width: 4.4
 *       stroke: 0.8
 *       gap: 0.15
 *       slant: 8              degrees, top to the right (default 0)
 *       ends: bevelled        or square
 *       point: {shape: round, size: 0.8, gap: 0.15, on: [1, 2, 3],
 *               at: [x, y]}   centre relative to the digit's origin
 *       colon: {after: [2], shape: round, size: 0.6, pitch: 11}
 *                             pitch: digit to digit across the colon
 *       minus: true           a sign unit one pitch before digit 1
 *       one: true             ... with a half digit "1"
 *       duty: 4               1 (static) to 4
 *       assignment: {a: [1, 1], b: [1, 2], ...}   (common, line)
 */
#include "digits-spec.h"
#include "model.h"

#include "units.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static bool read_list(const struct gp_node *node, long count, uint64_t *mask,
		      const char *what, struct gp_diag *diag)
{
	*mask = 0;
	if (node->kind == GP_NODE_SCALAR && strcmp(node->text, "all") == 0) {
		*mask = count >= 64 ? ~UINT64_C(0) : (UINT64_C(1) << count) - 1;
		return true;
	}
	if (!gp_node_expect_sequence(node, 0, diag))
		return false;
	for (size_t i = 0; i < node->count; i++) {
		long n;
		if (!gp_node_int(node->items[i], diag, 1, count, &n))
			return false;
		(void)what;
		*mask |= UINT64_C(1) << (n - 1);
	}
	return true;
}

static const char *const shapes[] = { "round", "square", NULL };

static bool read_point(struct gp_digits *row, const struct gp_node *node,
		       const char *what, struct gp_diag *diag)
{
	char label[200];
	snprintf(label, sizeof(label), "'point' of %s", what);
	struct gp_reader r;
	int shape = GP_DOT_ROUND;
	int64_t at[2] = { 0, 0 };
	row->point_size = row->figure.stroke;
	row->point_gap = row->figure.gap;
	row->point_mask = row->count >= 64 ? ~UINT64_C(0)
					   : (UINT64_C(1) << row->count) - 1;
	gp_reader_begin(&r, node, label, diag);
	bool ok = gp_read_choice(&r, "shape", false, shapes, &shape);
	ok &= gp_read_size(&r, "size", false, &row->point_size);
	ok &= gp_read_size(&r, "gap", false, &row->point_gap);
	const struct gp_node *at_node = gp_read_node(&r, "at", false);
	if (at_node) {
		ok &= gp_read_pair(&r, "at", true, at);
		row->point_placed = true;
		row->point_at = (struct gp_point){ at[0], at[1] };
	}
	const struct gp_node *on = gp_read_node(&r, "on", false);
	if (on)
		ok &= read_list(on, row->count, &row->point_mask, "on", diag);
	row->point_shape = (enum gp_dot_shape)shape;
	return gp_reader_end(&r) && ok;
}

static bool read_colon(struct gp_digits *row, const struct gp_node *node,
		       const char *what, struct gp_diag *diag)
{
	char label[200];
	snprintf(label, sizeof(label), "'colon' of %s", what);
	struct gp_reader r;
	int shape = GP_DOT_ROUND;
	row->colon_size = row->figure.stroke;
	gp_reader_begin(&r, node, label, diag);
	bool ok = gp_read_choice(&r, "shape", false, shapes, &shape);
	ok &= gp_read_size(&r, "size", false, &row->colon_size);
	ok &= gp_read_size(&r, "pitch", false, &row->colon_pitch);
	const struct gp_node *after = gp_read_node(&r, "after", true);
	if (after) {
		if (row->count < 2)
			ok = gp_diag_error(diag, &after->where,
					   "a colon needs two digits either "
					   "side; %s has %ld", what, row->count);
		else
			ok &= read_list(after, row->count - 1,
					&row->colon_mask, "after", diag);
	}
	row->colon_shape = (enum gp_dot_shape)shape;
	return gp_reader_end(&r) && ok;
}

static bool read_assignment(struct gp_digits *row, const struct gp_node *node,
			    struct gp_diag *diag)
{
	if (!gp_node_expect_map(node, diag))
		return false;
	row->pairs = calloc(node->count ? node->count : 1, sizeof(*row->pairs));
	if (!row->pairs)
		return gp_diag_oom(diag, &node->where);
	row->drive_where = node->where;
	bool ok = true;
	for (size_t i = 0; i < node->count; i++) {
		const struct gp_node *item = node->items[i];
		struct gp_digit_pair *pair = &row->pairs[row->pair_count++];
		pair->part = node->keys[i]->text;
		pair->where = item->where;
		long c = 0, l = 0;
		if (!gp_node_expect_sequence(item, 2, diag) ||
		    !gp_node_int(item->items[0], diag, 1, row->duty, &c) ||
		    !gp_node_int(item->items[1], diag, 1, GP_UNIT_MAX_PARTS,
				 &l)) {
			ok = false;
			continue;
		}
		pair->common = (int)c;
		pair->line = (int)l;
		/* names: the figure's segments and the extras */
		static const char *const extras[] = { "dp", "colon", "minus",
						      "one" };
		bool known = gp_figure_segment_index(row->figure.figure,
						     pair->part) >= 0;
		for (size_t k = 0; k < 4; k++)
			known |= strcmp(pair->part, extras[k]) == 0;
		if (!known) {
			const char *names[GP_FIGURE_MAX_SEGMENTS + 4];
			size_t n = gp_figure_segment_count(row->figure.figure);
			for (size_t k = 0; k < n; k++)
				names[k] = gp_figure_segment_name(
					row->figure.figure, k);
			for (size_t k = 0; k < 4; k++)
				names[n + k] = extras[k];
			const char *near = gp_nearest_word(pair->part, names,
							   n + 4);
			ok = gp_diag_error(diag, &node->keys[i]->where,
					   "'%s' is not a segment of a %zu-"
					   "segment digit%s%s%s",
					   pair->part, n,
					   near ? "; did you mean '" : "",
					   near ? near : "", near ? "'?" : "");
		}
	}
	return ok;
}

static bool read_figure(struct gp_reader *r, struct gp_digits *row)
{
	static const char *const kinds[] = { "7", "14", "16", NULL };
	static const char *const ends[] = { "bevelled", "square", NULL };
	int kind = 0, end = GP_ENDS_BEVELLED;
	struct gp_figure_spec *f = &row->figure;
	bool ok = gp_read_choice(r, "segments", false, kinds, &kind);
	ok &= gp_read_size(r, "height", true, &f->height);
	ok &= gp_read_size(r, "width", true, &f->width);
	ok &= gp_read_size(r, "stroke", true, &f->stroke);
	ok &= gp_read_size(r, "gap", true, &f->gap);
	ok &= gp_read_double(r, "slant", false, -30, 30, &f->slant);
	ok &= gp_read_choice(r, "ends", false, ends, &end);
	f->figure = (enum gp_figure)kind;
	f->ends = (enum gp_ends)end;
	return ok;
}

static bool read_row(struct gp_digits *row, const char *name,
		     const struct gp_node *node, struct gp_diag *diag)
{
	char what[160];
	snprintf(what, sizeof(what), "digits '%s'", name);
	struct gp_reader r;
	int64_t origin[2] = { 0, 0 };
	long duty = 1;
	memset(row, 0, sizeof(*row));
	row->name = name;
	row->where = node->where;
	row->count = 1;
	gp_reader_begin(&r, node, what, diag);
	if (!r.map)
		return gp_reader_end(&r);
	bool ok = gp_read_pair(&r, "origin", true, origin);
	ok &= gp_read_int(&r, "count", false, 1, GP_DIGITS_MAX_COUNT,
			  &row->count);
	ok &= gp_read_size(&r, "pitch", row->count > 1, &row->pitch);
	ok &= read_figure(&r, row);
	ok &= gp_read_bool(&r, "minus", false, &row->minus);
	ok &= gp_read_bool(&r, "one", false, &row->one);
	ok &= gp_read_int(&r, "duty", false, 1, 4, &duty);
	row->duty = (int)duty;
	row->origin = (struct gp_point){ origin[0], origin[1] };
	const struct gp_node *n;
	if (ok && (n = gp_read_node(&r, "point", false)))
		ok &= read_point(row, n, what, diag);
	if (ok && (n = gp_read_node(&r, "colon", false)))
		ok &= read_colon(row, n, what, diag);
	if (ok && (n = gp_read_node(&r, "assignment", false)))
		ok &= read_assignment(row, n, diag);
	if (!ok) {
		/* still declare the keys so that they are not "unknown" */
		gp_read_node(&r, "point", false);
		gp_read_node(&r, "colon", false);
		gp_read_node(&r, "assignment", false);
	}
	if (row->pitch == 0)
		row->pitch = row->figure.width * 2;
	ok = gp_reader_end(&r) && ok;
	return ok && gp_figure_check(&row->figure, what, &row->where, diag);
}

/* A row must not make digits overlap: the pitch exceeds the slanted
 * outline's width. */
static bool check_row(const struct gp_digits *row, struct gp_diag *diag)
{
	if (row->colon_mask && row->colon_pitch &&
	    row->colon_pitch <= row->figure.width) {
		char p[32], w[32];
		gp_format_mm_short(p, sizeof(p), row->colon_pitch);
		gp_format_mm_short(w, sizeof(w), row->figure.width);
		return gp_diag_error(diag, &row->where,
				     "digits '%s': the pitch across the colon "
				     "%s mm is not larger than the digit width "
				     "%s mm; digits would overlap",
				     row->name, p, w);
	}
	if (row->count > 1 && row->pitch <= row->figure.width) {
		char p[32], w[32];
		gp_format_mm_short(p, sizeof(p), row->pitch);
		gp_format_mm_short(w, sizeof(w), row->figure.width);
		return gp_diag_error(diag, &row->where,
				     "digits '%s': pitch %s mm is not larger "
				     "than the digit width %s mm; digits "
				     "would overlap",
				     row->name, p, w);
	}
	return true;
}

/* Each digit costs real layout work (shapes, back patches, leads): the
 * total over all rows is bounded so that a build stays quick. */
static bool check_total(const struct gp_design *design,
			const struct gp_node *node, struct gp_diag *diag)
{
	long total = 0;
	for (size_t i = 0; i < design->digit_count; i++)
		total += design->digits[i].count;
	if (total <= GP_DIGITS_MAX_TOTAL)
		return true;
	return gp_diag_error(diag, &node->where,
			     "the digit rows have %ld digits in all; the "
			     "limit is %d", total, GP_DIGITS_MAX_TOTAL);
}

bool gp_digits_read(struct gp_design *design, const struct gp_node *node,
		    struct gp_diag *diag)
{
	if (!gp_node_expect_map(node, diag))
		return false;
	if (node->count > GP_DIGITS_MAX_ROWS)
		return gp_diag_error(diag, &node->where,
				     "%zu digit rows; the limit is %d",
				     node->count, GP_DIGITS_MAX_ROWS);
	design->digits = calloc(node->count ? node->count : 1,
				sizeof(*design->digits));
	if (!design->digits)
		return gp_diag_oom(diag, &node->where);
	bool ok = true;
	for (size_t i = 0; i < node->count; i++) {
		struct gp_digits *row = &design->digits[i];
		design->digit_count = i + 1;
		ok &= read_row(row, node->keys[i]->text, node->items[i], diag) &&
		      check_row(row, diag);
	}
	return ok && check_total(design, node, diag);
}

void gp_digits_free(struct gp_digits *rows, size_t count)
{
	for (size_t i = 0; rows && i < count; i++)
		free(rows[i].pairs);
	free(rows);
}
