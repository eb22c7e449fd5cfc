/* Dimensions: the overview's dimension lines, the 100 mm ruler, and the
 * detail views with their own dimensions.
 *
 * Drawing conventions (ISO 129-1, from memory): extension lines start a
 * little off the feature and run a little past the dimension line; values
 * in millimetres without the unit; a value in parentheses is a reference
 * value and carries no tolerance.  The span of a row of cells or pads is
 * the toleranced dimension (the datum the layout keeps exact); the pitch
 * is given as a reference. */
#include "proof-internal.h"

#include "route.h"
#include "units.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

/* Default tolerances: common practice, no published source.  The pattern
 * is photolithographic (its spans hold a few hundredths of a millimetre);
 * the plates are scribed and broken (a few tenths). */
#define DEFAULT_SPAN_TOLERANCE (20 * 1000)       /* +-0.02 mm */
#define DEFAULT_OUTLINE_TOLERANCE (200 * 1000)   /* +-0.2 mm */

#define TIER 8.0            /* distance between dimension lines, mm */
#define FIRST_TIER 8.0      /* glass edge to the first dimension line */
#define ARROW 2.2           /* arrowhead length */
#define DIM_TEXT 2.2        /* dimension text height */
#define MAX_DIM_BLOCKS 3    /* blocks dimensioned on the overview */
#define MAX_PAD_ROWS 2
#define HALF_TURN_DOWN 1.57079632679489661923 /* pi/2 */

enum side { TOP, BOTTOM, LEFT, RIGHT, SIDES };

/* One dimension in the glass frame: along x for TOP/BOTTOM (a, b are x,
 * at is the feature's y), along y for LEFT/RIGHT (a, b are y). */
struct dim {
	enum side side;
	int tier;
	int64_t a, b;
	bool has_feature;         /* extension lines from feature, else */
	int64_t feature;          /* from the edge of the drawn box */
	char label[64];           /* "viewing area ", may be empty */
	char value[72];           /* "56", "47.25 +-0.02", "(3.15)" */
};

#define MAX_DIMS 64

struct dim_list {
	struct dim items[MAX_DIMS];
	int count;
	int tiers[SIDES];
};

static int64_t span_tolerance(const struct gp_design *d)
{
	return d->proof.span_tolerance ? d->proof.span_tolerance
				       : DEFAULT_SPAN_TOLERANCE;
}

static int64_t outline_tolerance(const struct gp_design *d)
{
	return d->proof.outline_tolerance ? d->proof.outline_tolerance
					  : DEFAULT_OUTLINE_TOLERANCE;
}

static struct dim *add_dim(struct dim_list *list, enum side side, int tier,
			   int64_t a, int64_t b)
{
	if (list->count == MAX_DIMS || a == b)
		return NULL;
	struct dim *d = &list->items[list->count++];
	d->side = side;
	d->tier = tier;
	d->a = a < b ? a : b;
	d->b = a < b ? b : a;
	d->label[0] = d->value[0] = '\0';
	d->has_feature = false;
	if (tier + 1 > list->tiers[side])
		list->tiers[side] = tier + 1;
	return d;
}

/* A dimension whose text is its value, with a prefix and suffix. */
static struct dim *value_dim(struct dim_list *list, enum side side,
			      int tier, int64_t a, int64_t b,
			      const char *prefix, int64_t tolerance,
			      bool reference)
{
	struct dim *d = add_dim(list, side, tier, a, b);
	if (!d)
		return NULL;
	char v[32], t[32];
	proof_mm(v, sizeof(v), d->b - d->a);
	proof_mm(t, sizeof(t), tolerance);
	snprintf(d->label, sizeof(d->label), "%s", prefix);
	if (reference)
		snprintf(d->value, sizeof(d->value), "(%s)", v);
	else if (tolerance)
		snprintf(d->value, sizeof(d->value), "%s \xc2\xb1%s", v, t);
	else
		snprintf(d->value, sizeof(d->value), "%s", v);
	return d;
}

static void from_feature(struct dim *d, int64_t feature)
{
	if (d) {
		d->has_feature = true;
		d->feature = feature;
	}
}

static int next_tier(const struct dim_list *list, enum side side)
{
	return list->tiers[side];
}

/* --- pads ----------------------------------------------------------------- */

/* A row of pads: shapes with the pad role whose centres share y (a
 * horizontal row) or x (a vertical one), sorted along the row. */
struct pad_row {
	bool vertical;
	int64_t centres[2];       /* first and second pad centre along */
	int64_t first, last;      /* first and last pad centre along */
	int64_t across;           /* the row's centre line */
	size_t count;
	size_t first_shape;       /* shape index of the first pad */
};

static struct gp_point pad_centre(const struct gp_shape *s)
{
	struct gp_box b = gp_polygon_bounds(&s->poly);
	return (struct gp_point){ (b.x0 + b.x1) / 2, (b.y0 + b.y1) / 2 };
}

static size_t find_pad_rows(const struct gp_artwork *art,
			    struct pad_row *rows, size_t max)
{
	size_t n = 0;
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->role != GP_ROLE_PAD)
			continue;
		struct gp_point c = pad_centre(s);
		size_t k;
		for (k = 0; k < n; k++)
			if (rows[k].vertical ? c.x == rows[k].across
					     : c.y == rows[k].across)
				break;
		if (k == n) {
			if (n == max)
				continue;
			/* a new row lies along x unless the ledge is at a
			 * side: decided by the pad's shape (long side across) */
			struct gp_box b = gp_polygon_bounds(&s->poly);
			rows[n] = (struct pad_row){
				.vertical = gp_box_width(b) > gp_box_height(b),
				.count = 0,
				.centres = { INT64_MAX, INT64_MAX },
				.first = INT64_MAX,
				.last = INT64_MIN,
			};
			rows[n].across = rows[n].vertical ? c.x : c.y;
			n++;
		}
		struct pad_row *r = &rows[k];
		int64_t along = r->vertical ? c.y : c.x;
		if (along < r->first) {
			r->centres[1] = r->first;
			r->first = along;
			r->first_shape = i;
		} else if (along < r->centres[1]) {
			r->centres[1] = along;
		}
		if (along > r->last)
			r->last = along;
		r->count++;
	}
	for (size_t k = 0; k < n; k++)
		rows[k].centres[0] = rows[k].first;
	return n;
}

/* --- the overview's list of dimensions --------------------------------------- */

static void block_dims(const struct gp_design *d, struct dim_list *list)
{
	int64_t tol = span_tolerance(d);
	size_t count = d->block_count < MAX_DIM_BLOCKS ? d->block_count
						       : MAX_DIM_BLOCKS;
	for (size_t i = 0; i < count; i++) {
		const struct gp_block *b = &d->blocks[i];
		struct gp_box e = gp_block_extent(b);
		if (b->cells > 1) {
			int t = next_tier(list, TOP);
			struct gp_point last =
				gp_block_dot(b, 0, b->cells - 1, 0, 0);
			char prefix[64];
			snprintf(prefix, sizeof(prefix), "%s cells 1-%ld: ",
				 b->name, b->cells);
			from_feature(value_dim(list, TOP, t, b->origin.x,
					       b->origin.x + b->cell_pitch,
					       "cell pitch ", 0, true),
				     e.y1);
			from_feature(value_dim(list, TOP, t + 1,
					       d->front.box.x0, b->origin.x,
					       "", 0, false),
				     e.y1);
			from_feature(value_dim(list, TOP, t + 1, b->origin.x,
					       last.x, prefix, tol, false),
				     e.y1);
		}
		if (b->lines > 1) {
			int t = next_tier(list, RIGHT);
			struct gp_point last =
				gp_block_dot(b, b->lines - 1, 0, 0, 0);
			char prefix[64];
			snprintf(prefix, sizeof(prefix), "%s lines 1-%ld: ",
				 b->name, b->lines);
			from_feature(value_dim(list, RIGHT, t,
					       b->origin.y - b->line_pitch,
					       b->origin.y, "line pitch ", 0,
					       true),
				     e.x1);
			from_feature(value_dim(list, RIGHT, t + 1, last.y,
					       b->origin.y, prefix, tol, false),
				     e.x1);
		}
	}
}

static void digit_dims(const struct gp_design *d, struct dim_list *list)
{
	int64_t tol = span_tolerance(d);
	size_t count = d->digit_count < MAX_DIM_BLOCKS ? d->digit_count
						       : MAX_DIM_BLOCKS;
	for (size_t i = 0; i < count; i++) {
		const struct gp_digits *r = &d->digits[i];
		if (r->count < 2)
			continue;
		int64_t top = r->origin.y + r->figure.height;
		int64_t last = r->origin.x + (r->count - 1) * r->pitch;
		int t = next_tier(list, TOP);
		char prefix[64];
		snprintf(prefix, sizeof(prefix), "%s digits 1-%ld: ", r->name,
			 r->count);
		from_feature(value_dim(list, TOP, t, r->origin.x,
				       r->origin.x + r->pitch, "digit pitch ",
				       0, true),
			     top);
		from_feature(value_dim(list, TOP, t + 1, d->front.box.x0,
				       r->origin.x, "", 0, false),
			     top);
		from_feature(value_dim(list, TOP, t + 1, r->origin.x, last,
				       prefix, tol, false),
			     top);
	}
}

/* The fill port's place and width along its side of the seal. */
static void port_dims(const struct gp_design *d, struct dim_list *list)
{
	if (!d->routing || !d->routing->seal.given)
		return;
	const struct gp_seal_spec *s = &d->routing->seal;
	struct gp_box in, out;
	gp_seal_boxes(d, &in, &out);
	int64_t a, b, lo, hi;
	gp_seal_port_span(d, &a, &b, &lo, &hi);
	static const enum side sides[GP_SIDE_COUNT] = { BOTTOM, RIGHT, TOP,
							LEFT };
	enum side side = sides[s->port_side];
	int64_t feature = s->port_side == GP_SIDE_BOTTOM ? out.y0
			  : s->port_side == GP_SIDE_TOP  ? out.y1
			  : s->port_side == GP_SIDE_LEFT ? out.x0
							 : out.x1;
	from_feature(value_dim(list, side, next_tier(list, side), a, b,
			       "fill port ", 0, false),
		     feature);
}

static void pad_dims(const struct gp_build *build, struct dim_list *list)
{
	struct pad_row rows[MAX_PAD_ROWS];
	size_t n = find_pad_rows(&build->art, rows, MAX_PAD_ROWS);
	const struct gp_design *d = build->design;
	struct gp_box g = gp_box_union(d->front.box, d->back.box);
	int64_t tol = span_tolerance(d);
	for (size_t k = 0; k < n; k++) {
		const struct pad_row *r = &rows[k];
		enum side side;
		if (r->vertical)
			side = 2 * r->across < g.x0 + g.x1 ? LEFT : RIGHT;
		else
			side = 2 * r->across < g.y0 + g.y1 ? BOTTOM : TOP;
		int t = next_tier(list, side);
		if (r->count > 1)
			from_feature(value_dim(list, side, t, r->centres[0],
					       r->centres[1], "pad pitch ", 0,
					       true),
				     r->across);
		int64_t edge = r->vertical ? d->front.box.y0 : d->front.box.x0;
		value_dim(list, side, t + 1, edge, r->first, "", 0, false);
		char prefix[64];
		snprintf(prefix, sizeof(prefix), "pads 1-%zu: ", r->count);
		from_feature(value_dim(list, side, t + 1, r->first, r->last,
				       prefix, tol, false),
			     r->across);
	}
}

static void plate_dims(const struct gp_design *d, struct dim_list *list)
{
	struct gp_box f = d->front.box, b = d->back.box, v = d->viewing;
	int64_t tol = outline_tolerance(d);
	/* viewing area: position from the front plate's edges, and size */
	int t = next_tier(list, TOP);
	value_dim(list, TOP, t, f.x0, v.x0, "", 0, false);
	value_dim(list, TOP, t, v.x0, v.x1, "viewing area ", 0, false);
	t = next_tier(list, LEFT);
	value_dim(list, LEFT, t, f.y0, v.y0, "", 0, false);
	value_dim(list, LEFT, t, v.y0, v.y1, "viewing area ", 0, false);
	/* plates */
	t = next_tier(list, TOP);
	value_dim(list, TOP, t, f.x0, f.x1, "front plate ", tol, false);
	if (b.x0 != f.x0 || b.x1 != f.x1) {
		value_dim(list, TOP, t + 1, b.x0, b.x1, "back plate ", tol,
			  false);
	}
	t = next_tier(list, LEFT);
	value_dim(list, LEFT, t, f.y0, f.y1, "front plate ", tol, false);
	if (b.y0 != f.y0 || b.y1 != f.y1)
		value_dim(list, LEFT, t + 1, b.y0, b.y1, "back plate ", tol,
			  false);
	/* ledges: where one plate runs past the other */
	t = next_tier(list, RIGHT);
	if (f.y0 != b.y0)
		value_dim(list, RIGHT, t, f.y0 < b.y0 ? f.y0 : b.y0,
			  f.y0 < b.y0 ? b.y0 : f.y0, "ledge ", 0, false);
	if (f.y1 != b.y1)
		value_dim(list, RIGHT, t, f.y1 < b.y1 ? f.y1 : b.y1,
			  f.y1 < b.y1 ? b.y1 : f.y1, "ledge ", 0, false);
	t = next_tier(list, BOTTOM);
	if (f.x0 != b.x0)
		value_dim(list, BOTTOM, t, f.x0 < b.x0 ? f.x0 : b.x0,
			  f.x0 < b.x0 ? b.x0 : f.x0, "ledge ", 0, false);
	if (f.x1 != b.x1)
		value_dim(list, BOTTOM, t, f.x1 < b.x1 ? f.x1 : b.x1,
			  f.x1 < b.x1 ? b.x1 : f.x1, "ledge ", 0, false);
}

static void overview_dim_list(const struct gp_build *build,
			      struct dim_list *list)
{
	memset(list, 0, sizeof(*list));
	block_dims(build->design, list);
	digit_dims(build->design, list);
	pad_dims(build, list);
	port_dims(build->design, list);
	plate_dims(build->design, list);
}

void proof_dim_room(const struct gp_build *build, double *left,
		    double *right, double *top, double *bottom)
{
	struct dim_list list;
	overview_dim_list(build, &list);
	double *room[SIDES] = { top, bottom, left, right };
	for (int s = 0; s < SIDES; s++)
		*room[s] = FIRST_TIER + TIER * list.tiers[s] + 4;
}

/* --- drawing a dimension ------------------------------------------------------ */

static void arrowhead(struct proof *p, double x, double y, double dx,
		      double dy)
{
	/* tip at (x, y), pointing along (dx, dy) (unit) */
	double w = ARROW / 3.5;
	cairo_move_to(p->cr, x, y);
	cairo_line_to(p->cr, x - dx * ARROW - dy * w, y - dy * ARROW + dx * w);
	cairo_line_to(p->cr, x - dx * ARROW + dy * w, y - dy * ARROW - dx * w);
	cairo_close_path(p->cr);
	cairo_fill(p->cr);
}

/* The text of a dimension along its line, in a frame whose u axis runs
 * along the line (ua < ub the line's ends) with the baseline at 0: all of
 * it between the arrows when it fits; else the value between them and the
 * label after the second (chained dimensions come before, never after);
 * else all of it after the second. */
static void dim_text(struct proof *p, double ua, double ub, bool inside,
		     const struct dim *d)
{
	char full[160];
	snprintf(full, sizeof(full), "%s%s", d->label, d->value);
	double gap = inside ? 1.0 : 2 * ARROW + 1.0;
	proof_font(p, DIM_TEXT, false);
	if (proof_text_width(p, full) + 2 < ub - ua) {
		proof_text(p, (ua + ub) / 2, 0, ALIGN_CENTRE, full);
	} else if (proof_text_width(p, d->value) + 2 < ub - ua) {
		proof_text(p, (ua + ub) / 2, 0, ALIGN_CENTRE, d->value);
		if (d->label[0])
			proof_text(p, ub + gap, 0, ALIGN_LEFT, d->label);
	} else {
		proof_text(p, ub + gap, 0, ALIGN_LEFT, full);
	}
}

/* A dimension line along x between paper a < b at paper y `at`, with
 * extension lines from the features at y fa and fb. */
static void hdim(struct proof *p, double a, double fa, double b, double fb,
		 double at, const struct dim *d)
{
	double sa = at < fa ? -1 : 1, sb = at < fb ? -1 : 1;
	proof_set_colour(p, proof_dim_colour, 1.0);
	proof_line(p, a, fa + sa * 1.0, a, at + sa * 1.5, 0.1);
	proof_line(p, b, fb + sb * 1.0, b, at + sb * 1.5, 0.1);
	bool inside = b - a >= 2.5 * ARROW;
	if (inside) {
		proof_line(p, a, at, b, at, 0.13);
		arrowhead(p, a, at, -1, 0);
		arrowhead(p, b, at, 1, 0);
	} else {
		proof_line(p, a - 2 * ARROW, at, b + 2 * ARROW, at, 0.13);
		arrowhead(p, a, at, 1, 0);
		arrowhead(p, b, at, -1, 0);
	}
	cairo_save(p->cr);
	cairo_translate(p->cr, 0, at - 0.8);
	dim_text(p, a, b, inside, d);
	cairo_restore(p->cr);
}

/* A dimension line along y between paper a < b (a above) at paper x `at`;
 * text reads from below, on the line's outer side. */
static void vdim(struct proof *p, double a, double fa, double b, double fb,
		 double at, const struct dim *d)
{
	double sa = at < fa ? -1 : 1, sb = at < fb ? -1 : 1;
	proof_set_colour(p, proof_dim_colour, 1.0);
	proof_line(p, fa + sa * 1.0, a, at + sa * 1.5, a, 0.1);
	proof_line(p, fb + sb * 1.0, b, at + sb * 1.5, b, 0.1);
	bool inside = b - a >= 2.5 * ARROW;
	if (inside) {
		proof_line(p, at, a, at, b, 0.13);
		arrowhead(p, at, a, 0, -1);
		arrowhead(p, at, b, 0, 1);
	} else {
		proof_line(p, at, a - 2 * ARROW, at, b + 2 * ARROW, 0.13);
		arrowhead(p, at, a, 0, 1);
		arrowhead(p, at, b, 0, -1);
	}
	/* rotated a quarter turn: u runs up the sheet, u = -y */
	cairo_save(p->cr);
	cairo_translate(p->cr, at - 0.8, 0);
	cairo_rotate(p->cr, -HALF_TURN_DOWN);
	dim_text(p, -b, -a, inside, d);
	cairo_restore(p->cr);
}

/* Draws list around the glass box g of view v; features are taken at the
 * glass edge nearest the dimension (extension lines from the glass). */
static void draw_dims(struct proof *p, const struct proof_view *v,
		      const struct dim_list *list, struct gp_box g)
{
	double gx0 = proof_x(v, g.x0), gx1 = proof_x(v, g.x1);
	double gy0 = proof_y(v, g.y1), gy1 = proof_y(v, g.y0); /* top, bottom */
	for (int i = 0; i < list->count; i++) {
		const struct dim *d = &list->items[i];
		double off = FIRST_TIER + TIER * d->tier;
		double fx0 = d->has_feature ? proof_x(v, d->feature) : gx0;
		double fx1 = d->has_feature ? proof_x(v, d->feature) : gx1;
		double fy0 = d->has_feature ? proof_y(v, d->feature) : gy0;
		double fy1 = d->has_feature ? proof_y(v, d->feature) : gy1;
		switch (d->side) {
		case TOP:
			hdim(p, proof_x(v, d->a), fy0, proof_x(v, d->b), fy0,
			     gy0 - off, d);
			break;
		case BOTTOM:
			hdim(p, proof_x(v, d->a), fy1, proof_x(v, d->b), fy1,
			     gy1 + off, d);
			break;
		case LEFT:
			vdim(p, proof_y(v, d->b), fx0, proof_y(v, d->a), fx0,
			     gx0 - off, d);
			break;
		case RIGHT:
			vdim(p, proof_y(v, d->b), fx1, proof_y(v, d->a), fx1,
			     gx1 + off + 2.5, d);
			break;
		default:
			break;
		}
	}
}

void proof_overview_dims(struct proof *p)
{
	struct dim_list list;
	overview_dim_list(p->build, &list);
	draw_dims(p, &p->view, &list,
		  gp_box_union(p->design->front.box, p->design->back.box));
	char a[32], b[32];
	proof_mm(a, sizeof(a), span_tolerance(p->design));
	proof_mm(b, sizeof(b), outline_tolerance(p->design));
	double x0, y0, x1, y1;
	proof_area(p, &x0, &y0, &x1, &y1);
	proof_font(p, 2.2, false);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_textf(p, x0, y0 + 5, ALIGN_LEFT,
		    "Dimensions in mm.  Values in parentheses are reference "
		    "values without tolerance.  Spans of cells, lines and "
		    "pads \xc2\xb1%s, plates \xc2\xb1%s.",
		    a, b);
}

/* --- the ruler ---------------------------------------------------------------- */

void proof_ruler(struct proof *p)
{
	double x = p->plan.ruler_x, y = p->plan.ruler_y;
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_line(p, x, y, x + GP_PROOF_RULER_MM, y, 0.15);
	proof_font(p, 1.8, false);
	for (int mm = 0; mm <= GP_PROOF_RULER_MM; mm++) {
		double len = mm % 10 == 0 ? 4.0 : mm % 5 == 0 ? 3.0 : 1.8;
		double below = mm % 50 == 0 ? 2.5 : 0.0;
		proof_line(p, x + mm, y + below, x + mm, y - len, 0.1);
		if (mm % 10 == 0)
			proof_textf(p, x + mm, y - 4.6, ALIGN_CENTRE, "%d", mm);
	}
	proof_font(p, 2.2, false);
	proof_text(p, x + GP_PROOF_RULER_MM + 4, y, ALIGN_LEFT,
		   "100 mm: measure to check the printer's scale "
		   "(print at 100%)");
}

/* --- detail views --------------------------------------------------------------- */

/* Enlargements recommended by ISO 5455 (from memory), largest first;
 * 10:1 unless the view does not fit on the sheet. */
static const int enlargements[] = { 10, 5, 2, 1 };

#define DETAIL_TITLE 11.0   /* title and scale above a view */
#define DETAIL_GAP 6.0

struct detail {
	const char *title;
	struct gp_box window;     /* glass frame */
	struct dim_list dims;
	const char *missing;      /* text when there is nothing to show */
	int scale;                /* enlargement chosen */
	double w, h;              /* paper size of the view with its room */
	int sheet;                /* 0-based among the detail sheets */
	double x, y;              /* top-left corner on that sheet */
};

static void detail_cell(const struct gp_build *build, struct detail *d)
{
	d->title = "One dot-matrix cell";
	if (!build->design->block_count) {
		d->missing = "no dot-matrix blocks in this design";
		return;
	}
	const struct gp_block *b = &build->design->blocks[0];
	struct gp_point o = b->origin;
	struct gp_point last =
		gp_block_dot(b, 0, 0, b->dots_down - 1, b->dots_across - 1);
	struct gp_box cell = gp_box_make(o.x, last.y - b->dot_height,
					 last.x + b->dot_width, o.y);
	int64_t m = b->dot_pitch_x - b->dot_width + 100 * 1000;
	d->window = gp_box_make(cell.x0 - m, cell.y0 - m, cell.x1 + m,
				cell.y1 + m);
	struct dim_list *l = &d->dims;
	from_feature(value_dim(l, TOP, 0, o.x, o.x + b->dot_width, "", 0,
			       false),
		     o.y);
	if (b->dots_across > 1)
		from_feature(value_dim(l, TOP, 1, o.x, o.x + b->dot_pitch_x,
				       "pitch ", 0, false),
			     o.y);
	from_feature(value_dim(l, TOP, 2, cell.x0, cell.x1, "cell ", 0, false),
		     o.y);
	from_feature(value_dim(l, LEFT, 0, o.y - b->dot_height, o.y, "", 0,
			       false),
		     o.x);
	if (b->dots_down > 1)
		from_feature(value_dim(l, LEFT, 1, o.y - b->dot_pitch_y, o.y,
				       "pitch ", 0, false),
			     o.x);
	from_feature(value_dim(l, LEFT, 2, cell.y0, cell.y1, "cell ", 0,
			       false),
		     o.x);
}

static bool owned_box(const struct gp_artwork *art, int kind,
		      struct gp_box *box)
{
	*box = gp_box_none();
	bool any = false;
	int unit = -1;            /* digits: the first digit met (not a sign) */
	for (size_t i = 0; i < art->pixel_count; i++) {
		const struct gp_pixel *px = &art->pixels[i];
		if (px->owner_kind != kind || px->owner != 0)
			continue;
		if (kind == GP_OWNER_DIGITS) {
			if (px->a == 0)
				continue;
			if (unit < 0)
				unit = px->a;
			if (px->a != unit)
				continue;
		}
		*box = any ? gp_box_union(*box, px->box) : px->box;
		any = true;
	}
	return any;
}

static void detail_owned(const struct gp_build *build, struct detail *d,
			 int kind)
{
	struct gp_box box;
	d->title = kind == GP_OWNER_ICON ? "One icon" : "One digit";
	if (!owned_box(&build->art, kind, &box)) {
		d->missing = kind == GP_OWNER_ICON
				     ? "no icons in this design"
				     : "no digits in this design";
		return;
	}
	int64_t m = 300 * 1000;
	d->window = gp_box_make(box.x0 - m, box.y0 - m, box.x1 + m,
				box.y1 + m);
	from_feature(value_dim(&d->dims, TOP, 0, box.x0, box.x1, "", 0,
			       false),
		     box.y1);
	from_feature(value_dim(&d->dims, LEFT, 0, box.y0, box.y1, "", 0,
			       false),
		     box.x0);
}

static void detail_pads(const struct gp_build *build, struct detail *d)
{
	struct pad_row rows[1];
	d->title = "A group of pads";
	if (!find_pad_rows(&build->art, rows, 1)) {
		d->missing = "no pads in this artwork (nothing routed)";
		return;
	}
	const struct pad_row *r = &rows[0];
	struct gp_box first =
		gp_polygon_bounds(&build->art.shapes[r->first_shape].poly);
	int64_t pitch = r->count > 1 ? r->centres[1] - r->centres[0] : 0;
	int64_t shown = pitch * (r->count < 4 ? (int64_t)r->count - 1 : 3);
	struct gp_box group = first;
	if (r->vertical)
		group.y1 += shown;
	else
		group.x1 += shown;
	int64_t m = 300 * 1000;
	d->window = gp_box_make(group.x0 - m, group.y0 - m, group.x1 + m,
				group.y1 + m);
	struct dim_list *l = &d->dims;
	if (r->vertical) {
		value_dim(l, LEFT, 0, first.y0, first.y1, "", 0, false);
		if (pitch)
			value_dim(l, LEFT, 1, first.y0, first.y0 + pitch,
				  "pitch ", 0, false);
		value_dim(l, TOP, 0, first.x0, first.x1, "", 0, false);
	} else {
		value_dim(l, TOP, 0, first.x0, first.x1, "", 0, false);
		if (pitch)
			value_dim(l, TOP, 1, first.x0, first.x0 + pitch,
				  "pitch ", 0, false);
		value_dim(l, LEFT, 0, first.y0, first.y1, "", 0, false);
	}
}

static double side_room(const struct dim_list *l, enum side side)
{
	return l->tiers[side] ? FIRST_TIER + TIER * l->tiers[side] + 4 : 2;
}

/* Picks the largest enlargement at which the view fits in aw x ah. */
static void detail_fit(struct detail *d, double aw, double ah)
{
	double rx = side_room(&d->dims, LEFT) + side_room(&d->dims, RIGHT);
	double ry = side_room(&d->dims, TOP) + side_room(&d->dims, BOTTOM) +
		    DETAIL_TITLE;
	double ww = gp_mm(gp_box_width(d->window));
	double wh = gp_mm(gp_box_height(d->window));
	size_t n = sizeof(enlargements) / sizeof(enlargements[0]), k = 0;
	while (k + 1 < n && (enlargements[k] * ww + rx > aw ||
			     enlargements[k] * wh + ry > ah))
		k++;
	d->scale = enlargements[k];
	d->w = d->scale * ww + rx;
	d->h = d->scale * wh + ry;
	if (d->w < 70)
		d->w = 70;
}

#define DETAIL_COUNT 4

/* Shelf packing of the views over as many sheets as they need; returns
 * the number of sheets. */
static int details_plan(const struct gp_build *build,
			const struct gp_proof_plan *plan,
			struct detail details[DETAIL_COUNT])
{
	memset(details, 0, DETAIL_COUNT * sizeof(*details));
	detail_cell(build, &details[0]);
	detail_owned(build, &details[1], GP_OWNER_ICON);
	detail_owned(build, &details[2], GP_OWNER_DIGITS);
	detail_pads(build, &details[3]);
	double x0 = PROOF_MARGIN + 4, y0 = PROOF_MARGIN + 4 + 8;
	double x1 = plan->paper_w - PROOF_MARGIN - 4;
	double y1 = plan->paper_h - PROOF_MARGIN - PROOF_TITLE_H - 4;
	int sheet = 0;
	double x = x0, y = y0, shelf = 0;
	for (int i = 0; i < DETAIL_COUNT; i++) {
		struct detail *d = &details[i];
		d->sheet = -1;    /* a note under the first sheet's views */
		if (d->missing)
			continue;
		detail_fit(d, x1 - x0, y1 - y0);
		if (x > x0 && x + d->w > x1) {
			x = x0;
			y += shelf + DETAIL_GAP;
			shelf = 0;
		}
		if (y > y0 && y + d->h > y1) {
			sheet++;
			x = x0;
			y = y0;
			shelf = 0;
		}
		d->sheet = sheet;
		d->x = x;
		d->y = y;
		x += d->w + DETAIL_GAP;
		if (d->h > shelf)
			shelf = d->h;
	}
	return sheet + 1;
}

int proof_detail_sheet_count(const struct gp_build *build,
			     const struct gp_proof_plan *plan)
{
	struct detail details[DETAIL_COUNT];
	return details_plan(build, plan, details);
}

static void draw_detail(struct proof *p, const struct detail *d)
{
	cairo_t *cr = p->cr;
	cairo_set_source_rgb(cr, 0, 0, 0);
	proof_font(p, 3.0, true);
	proof_text(p, d->x, d->y + 4, ALIGN_LEFT, d->title);
	proof_font(p, 2.5, false);
	proof_textf(p, d->x, d->y + 8.5, ALIGN_LEFT, "scale %d:1", d->scale);
	double s = d->scale;
	struct proof_view v;
	memset(&v, 0, sizeof(v));
	v.s = s;
	v.windowed = true;
	v.window = d->window;
	v.ox = d->x + side_room(&d->dims, LEFT) - s * gp_mm(d->window.x0);
	v.oy = d->y + DETAIL_TITLE + side_room(&d->dims, TOP) +
	       s * gp_mm(d->window.y1);
	cairo_save(cr);
	proof_add_box(p, &v, d->window);
	cairo_clip(cr);
	proof_fill_layer(p, &v, GP_LAYER_FRONT_ITO, ~0u, proof_front_colour,
			 0.45);
	proof_fill_layer(p, &v, GP_LAYER_BACK_ITO, ~0u, proof_back_colour,
			 0.45);
	cairo_restore(cr);
	cairo_set_source_rgb(cr, 0.4, 0.4, 0.4);
	cairo_set_line_width(cr, 0.15);
	proof_add_box(p, &v, d->window);
	cairo_stroke(cr);
	draw_dims(p, &v, &d->dims, d->window);
}

/* What the design has no view of, in the band beside the title block. */
static void detail_notes(struct proof *p, const struct detail *details)
{
	double x = PROOF_MARGIN + 4;
	double y = p->plan.paper_h - PROOF_MARGIN - PROOF_TITLE_H + 4;
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	for (int i = 0; i < DETAIL_COUNT; i++) {
		if (!details[i].missing)
			continue;
		proof_font(p, 2.5, false);
		proof_textf(p, x, y, ALIGN_LEFT, "%s: %s.", details[i].title,
			    details[i].missing);
		y += 4;
	}
}

void proof_sheets_details(struct proof *p)
{
	struct detail details[DETAIL_COUNT];
	int sheets = details_plan(p->build, &p->plan, details);
	for (int sheet = 0; sheet < sheets; sheet++) {
		char title[64];
		if (sheets > 1)
			snprintf(title, sizeof(title), "Details (%d of %d)",
				 sheet + 1, sheets);
		else
			snprintf(title, sizeof(title), "Details");
		proof_begin_sheet(p, title);
		for (int i = 0; i < DETAIL_COUNT; i++)
			if (details[i].sheet == sheet)
				draw_detail(p, &details[i]);
		if (sheet == 0)
			detail_notes(p, details);
		proof_end_sheet(p);
	}
}
