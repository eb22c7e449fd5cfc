/* Segment digits: the units of a row, their lead-ins toward the ledge and
 * the (common, segment line) assignment.
 *
 * Lead-ins (the ledge is below the row, toward -y):
 * - segments on the outside of the figure (e, f, b, c) leave sideways to
 *   a lane beside the digit and run down it; lanes are parallel to the
 *   digit's sides, the lowest lead-in on the innermost lane, so that no
 *   two cross;
 * - the middle bar leaves through the gap between the two uprights of one
 *   side (g to the right; g1 left and g2 right);
 * - the top bar rises and runs over the top to the outermost lane;
 * - diagonals and the centre uprights leave through the corner gaps (two
 *   side by side where two must: such corners need a gap of at least two
 *   lines and three spaces);
 * - the bottom bar, the point, the colon and the minus drop straight down.
 * Every lead-in ends on one line below the unit; the lead-ins of one
 * segment line are then joined by a bar there and one drop continues to
 * the row's lower edge (a port for the routing).
 *
 * Assignment (documented scheme): the parts are taken in the order their
 * lead-ins reach that line, left to right; runs of at most `duty` parts
 * share a segment line (so each line's lead-ins are neighbours and join
 * without crossing), and within a run the commons go from the top down.
 * This uses ceil(parts / duty) segment lines per unit, the least possible.
 *
 * The grid (7 segments with a point at 1/4 duty): the lanes above would
 * wall each digit in on the segment plate, and four commons cannot all be
 * joined above the row without crossing.  Instead the two segment lines
 * run inside the digit as chains, a-f-e-d and b-g-c-dp, each link a short
 * bridge across the gap between two of its segments, and leave straight
 * down from d and from the point; the commons run across the digits on the
 * common plate (laid out with the patches, digits-layout.c): COM1 a-b,
 * COM2 f-g, COM3 e-c through the lower counter, COM4 d-dp under the
 * baseline.  A line crosses a common only at their pixel. */
#include "digits.h"

#include "units.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

struct pt {
	double x, y;
};

enum route_kind {
	ROUTE_LEFT,  /* to a lane left of the unit */
	ROUTE_RIGHT, /* to a lane right of the unit */
	ROUTE_DOWN,  /* straight down at upright position u_down */
};

#define ROUTE_MAX_POINTS 8

struct route {
	int part, poly;
	enum route_kind kind;
	struct pt pts[ROUTE_MAX_POINTS]; /* relative to the unit origin */
	int n;
	double u_down;
	int lane;
};

struct plan {
	const struct gp_digits *row;
	const struct gp_digit_rules *rules;
	struct gp_figure_frame fr;
	struct gp_digit_unit *unit;
	double w, sp, pitch;      /* lead width, space, lane pitch */
	double delta;             /* half the distance of two side by side */
	/* How far a lead-in running beside a segment keeps from it: the
	 * segment's back patch reaches out by the registration box and the
	 * patch is notched by the same box around the lead-in; two boxes of
	 * r across any edge direction need 2 r (|nx| + |ny|) <= 2 r sqrt 2,
	 * so at this distance the notch never reaches into what the segment
	 * needs and every segment stays covered under any shift. */
	double keep;
	struct route routes[GP_UNIT_MAX_TRACES];
	int n;
	bool overflow;
	double left_edge;         /* leftmost upright u used by non-lane leads */
	double right_edge;
	double top;               /* highest point reached by corner leads */
	double v_col;             /* where lead-ins end */
	double v_end;             /* where drops end */
};

static struct pt P(const struct plan *p, double u, double v)
{
	return (struct pt){ u + v * p->fr.t, v };
}

static double upright(const struct plan *p, struct pt q)
{
	return q.x - q.y * p->fr.t;
}

/* --- units ------------------------------------------------------------------ */

static struct gp_digit_part *add_part(struct gp_digit_unit *u,
				      const char *name)
{
	struct gp_digit_part *part = &u->parts[u->part_count++];
	memset(part, 0, sizeof(*part));
	snprintf(part->name, sizeof(part->name), "%s", name);
	part->common_net = part->segment_net = -1;
	return part;
}

static void set_height(struct gp_digit_part *part)
{
	struct gp_box b = gp_polygon_bounds(&part->poly[0]);
	for (int i = 1; i < part->poly_count; i++)
		b = gp_box_union(b, gp_polygon_bounds(&part->poly[i]));
	part->height = ((double)b.y0 + (double)b.y1) / 2;
}

static bool digit_unit(const struct gp_digits *row, long i, int64_t tol,
		       struct gp_digit_unit *u, struct gp_diag *diag)
{
	struct gp_polygon seg[GP_FIGURE_MAX_SEGMENTS];
	const struct gp_figure_spec *fs = &row->figure;
	u->number = (int)i + 1;
	u->origin = (struct gp_point){ row->origin.x + gp_digits_offset(row, i),
				       row->origin.y };
	char what[96];
	snprintf(what, sizeof(what), "digits '%s'", row->name);
	if (!gp_figure_build(fs, u->origin, what, &row->where, seg, diag))
		goto fail;
	size_t n = gp_figure_segment_count(fs->figure);
	for (size_t s = 0; s < n; s++) {
		struct gp_digit_part *part =
			add_part(u, gp_figure_segment_name(fs->figure, s));
		part->poly[0] = seg[s];
		gp_polygon_init(&seg[s]);
		part->poly_count = 1;
		set_height(part);
	}
	if (row->point_mask >> i & 1) {
		struct gp_point c =
			row->point_placed
				? (struct gp_point){ u->origin.x + row->point_at.x,
						     u->origin.y + row->point_at.y }
				: gp_point_default_centre(fs, u->origin,
							  row->point_shape,
							  row->point_size,
							  row->point_gap);
		struct gp_digit_part *part = add_part(u, "dp");
		part->poly_count = 1;
		if (!gp_dot_build(row->point_shape, row->point_size, fs->slant,
				  c, tol, &part->poly[0]))
			return gp_diag_oom(diag, NULL);
		set_height(part);
	}
	if (row->colon_mask >> i & 1) {
		struct gp_figure_frame fr;
		gp_figure_frame(fs, &fr);
		double mid = (fr.W + (double)(gp_digits_offset(row, i + 1) -
					      gp_digits_offset(row, i))) / 2;
		double v[2] = { (fr.S + fr.mlo) / 2, (fr.mtop + fr.H - fr.S) / 2 };
		struct gp_digit_part *part = add_part(u, "colon");
		part->poly_count = 2;
		for (int k = 0; k < 2; k++) {
			struct gp_point c = {
				u->origin.x + llround(mid + v[k] * fr.t),
				u->origin.y + llround(v[k]),
			};
			if (!gp_dot_build(row->colon_shape, row->colon_size,
					  fs->slant, c, tol, &part->poly[k]))
				return gp_diag_oom(diag, NULL);
		}
		set_height(part);
	}
	return true;
fail:
	return false;
}

/* The sign unit, one pitch before digit 1: the minus is the middle bar and
 * the "1" the two right uprights of a 7-segment figure of the same size. */
static bool sign_unit(const struct gp_digits *row, struct gp_digit_unit *u,
		      struct gp_diag *diag)
{
	struct gp_figure_spec fs = row->figure;
	struct gp_polygon seg[7];
	fs.figure = GP_FIGURE_7;
	u->number = 0;
	u->origin = (struct gp_point){ row->origin.x - row->pitch,
				       row->origin.y };
	char what[96];
	snprintf(what, sizeof(what), "digits '%s'", row->name);
	if (!gp_figure_build(&fs, u->origin, what, &row->where, seg, diag))
		return false;
	if (row->minus) {
		struct gp_digit_part *part = add_part(u, "minus");
		part->poly[0] = seg[6];
		gp_polygon_init(&seg[6]);
		part->poly_count = 1;
		set_height(part);
	}
	if (row->one) {
		struct gp_digit_part *part = add_part(u, "one");
		part->poly[0] = seg[1];
		part->poly[1] = seg[2];
		gp_polygon_init(&seg[1]);
		gp_polygon_init(&seg[2]);
		part->poly_count = 2;
		set_height(part);
	}
	for (int s = 0; s < 7; s++)
		gp_polygon_finish(&seg[s]);
	return true;
}

int64_t gp_digits_offset(const struct gp_digits *row, long i)
{
	int64_t x = 0;
	for (long k = 0; k < i; k++)
		x += row->colon_pitch && (row->colon_mask >> k & 1)
			     ? row->colon_pitch
			     : row->pitch;
	return x;
}

void gp_digit_unit_label(const struct gp_digit_unit *unit, char *buffer,
			 size_t size)
{
	if (unit->number == 0)
		snprintf(buffer, size, "the sign unit");
	else
		snprintf(buffer, size, "digit %d", unit->number);
}

static int part_index(const struct gp_digit_unit *u, const char *name)
{
	for (int i = 0; i < u->part_count; i++)
		if (strcmp(u->parts[i].name, name) == 0)
			return i;
	return -1;
}

/* --- routes ---------------------------------------------------------------- */

static struct route *add_route(struct plan *p, const char *name, int poly,
			       enum route_kind kind)
{
	int part = part_index(p->unit, name);
	if (part < 0)
		return NULL;
	if (p->n == GP_UNIT_MAX_TRACES) {
		p->overflow = true;
		return NULL;
	}
	struct route *r = &p->routes[p->n++];
	memset(r, 0, sizeof(*r));
	r->part = part;
	r->poly = poly;
	r->kind = kind;
	return r;
}

static void push(struct route *r, struct pt q)
{
	if (r && r->n < ROUTE_MAX_POINTS)
		r->pts[r->n++] = q;
}

/* A point of the part's polygon relative to the unit origin. */
static struct pt rel(const struct plan *p, struct gp_point q)
{
	return (struct pt){ (double)(q.x - p->unit->origin.x),
			    (double)(q.y - p->unit->origin.y) };
}

/* Middle of the polygon's highest (top) or lowest edge. */
static struct pt edge_middle(const struct plan *p, const struct gp_polygon *poly,
			     bool top)
{
	const struct gp_ring *r = &poly->outer;
	size_t best = 0;
	double best_y = top ? -INFINITY : INFINITY;
	for (size_t i = 0; i < r->count; i++) {
		struct gp_point a = r->points[i], b = r->points[(i + 1) % r->count];
		double y = ((double)a.y + (double)b.y) / 2;
		if (top ? y > best_y : y < best_y) {
			best_y = y;
			best = i;
		}
	}
	struct pt a = rel(p, r->points[best]);
	struct pt b = rel(p, r->points[(best + 1) % r->count]);
	return (struct pt){ (a.x + b.x) / 2, (a.y + b.y) / 2 };
}

/* A point inside the polygon near its vertex closest to q. */
static struct pt inside_near(const struct plan *p, const struct gp_polygon *poly,
			     struct pt q)
{
	const struct gp_ring *r = &poly->outer;
	struct pt c = { 0, 0 }, best = { 0, 0 };
	double best_d = INFINITY;
	for (size_t i = 0; i < r->count; i++) {
		struct pt v = rel(p, r->points[i]);
		c.x += v.x / (double)r->count;
		c.y += v.y / (double)r->count;
		double d = hypot(v.x - q.x, v.y - q.y);
		if (d < best_d) {
			best_d = d;
			best = v;
		}
	}
	/* a line width in, so that a lead-in from here leaves through the
	 * corner rather than along a side */
	double d = hypot(c.x - best.x, c.y - best.y);
	double k = d > 0 ? fmin(0.25, 2 * p->w / d) : 0;
	return (struct pt){ best.x + k * (c.x - best.x),
			    best.y + k * (c.y - best.y) };
}

struct line {
	struct pt a;  /* a point on it */
	struct pt d;  /* unit direction */
};

static struct line line_through(struct pt a, struct pt b)
{
	double dx = b.x - a.x, dy = b.y - a.y, len = hypot(dx, dy);
	return (struct line){ a, { dx / len, dy / len } };
}

/* The line moved by off to the side of `toward`. */
static struct line line_offset(struct line l, struct pt toward, double off)
{
	struct pt n = { -l.d.y, l.d.x };
	if (n.x * (toward.x - l.a.x) + n.y * (toward.y - l.a.y) < 0)
		n = (struct pt){ -n.x, -n.y };
	l.a.x += n.x * off;
	l.a.y += n.y * off;
	return l;
}

static struct pt line_meet(struct line l, struct line m)
{
	double det = l.d.x * m.d.y - l.d.y * m.d.x;
	double t = ((m.a.x - l.a.x) * m.d.y - (m.a.y - l.a.y) * m.d.x) / det;
	return (struct pt){ l.a.x + t * l.d.x, l.a.y + t * l.d.y };
}

static struct pt foot(struct line l, struct pt q)
{
	double t = (q.x - l.a.x) * l.d.x + (q.y - l.a.y) * l.d.y;
	return (struct pt){ l.a.x + t * l.d.x, l.a.y + t * l.d.y };
}

/* Where a lead along l leaves the unit sideways (left or right) or down. */
static struct pt leave_side(const struct plan *p, struct line l, bool right)
{
	double u = right ? p->fr.W + (p->keep + p->w / 2) * p->fr.sec
			 : -(p->keep + p->w / 2) * p->fr.sec;
	struct line side = line_through(P(p, u, 0), P(p, u, p->fr.H));
	return line_meet(l, side);
}

static struct pt leave_down(const struct plan *p, struct line l)
{
	struct line base = { { 0, -(p->keep + p->w / 2) }, { 1, 0 } };
	return line_meet(l, base);
}

static void side_stub(struct plan *p, const char *name, int poly, bool right,
		      double u, double v)
{
	struct route *r = add_route(p, name, poly, right ? ROUTE_RIGHT : ROUTE_LEFT);
	push(r, P(p, u, v));
}

static void note_down(struct plan *p, struct route *r)
{
	if (!r)
		return;
	p->left_edge = fmin(p->left_edge, r->u_down);
	p->right_edge = fmax(p->right_edge, r->u_down);
}

/* Straight down from (u, v); noted so that lanes keep clear of it. */
static void down(struct plan *p, const char *name, int poly, double u, double v)
{
	struct route *r = add_route(p, name, poly, ROUTE_DOWN);
	push(r, P(p, u, v));
	if (r)
		r->u_down = u;
	note_down(p, r);
}

/* Upright position of the left side of the unit's point (far right when
 * it has none). */
static double point_left(const struct plan *p)
{
	int k = part_index(p->unit, "dp");
	if (k < 0)
		return INFINITY;
	const struct gp_ring *r = &p->unit->parts[k].poly[0].outer;
	double least = INFINITY;
	for (size_t i = 0; i < r->count; i++)
		least = fmin(least, upright(p, rel(p, r->points[i])));
	return least;
}

/* Two (or one) lead-ins through a top corner: `outer` from the centre
 * upright along the channel under the top bar, `inner` from the diagonal.
 * right: the top-right corner. */
static void top_corner(struct plan *p, const char *outer, const char *inner,
		       bool right)
{
	const struct gp_figure_frame *f = &p->fr;
	double W = f->W, H = f->H, S = f->S, G = f->G, sv = f->sv;
	int io = part_index(p->unit, outer ? outer : "");
	int ii = part_index(p->unit, inner);
	if (ii < 0)
		return;
	bool two = io >= 0;
	double d = two ? p->delta : 0;
	double vch = H - S - G / 2;
	struct route *ro = two ? add_route(p, outer, 0, right ? ROUTE_RIGHT
							       : ROUTE_LEFT)
			       : NULL;
	struct route *ri = add_route(p, inner, 0, right ? ROUTE_RIGHT : ROUTE_LEFT);
	struct pt mo = two ? edge_middle(p, &p->unit->parts[io].poly[0], true)
			   : (struct pt){ 0, 0 };
	if (p->row->figure.ends == GP_ENDS_SQUARE) {
		struct pt mi = edge_middle(p, &p->unit->parts[ii].poly[0], true);
		push(ri, (struct pt){ mi.x, mi.y - p->w });
		push(ri, (struct pt){ mi.x, vch - d });
		if (ro) {
			push(ro, (struct pt){ mo.x, mo.y - p->w });
			push(ro, (struct pt){ mo.x, vch + d });
		}
		return;
	}
	struct pt outer_corner = P(p, right ? W : 0, H);
	struct pt inner_corner = P(p, right ? W - sv : sv, H - S);
	struct line g = line_through(inner_corner, outer_corner);
	struct pt top_side = P(p, W / 2, H);   /* the top bar's side */
	struct line lo = line_offset(g, top_side, d);
	struct line li = line_offset(g, top_side, -d);
	/* the diagonal: from just inside its end onto its line, out */
	struct pt si = inside_near(p, &p->unit->parts[ii].poly[0], inner_corner);
	push(ri, si);
	push(ri, foot(li, si));
	struct pt ti = leave_side(p, li, right);
	push(ri, ti);
	p->top = fmax(p->top, ti.y);
	if (!ro)
		return;
	/* the centre upright: up into the channel, along it, out */
	struct line ch = { { 0, vch }, { 1, 0 } };
	push(ro, (struct pt){ mo.x, mo.y - p->w });
	push(ro, (struct pt){ mo.x, vch });
	push(ro, line_meet(ch, lo));
	struct pt to = leave_side(p, lo, right);
	push(ro, to);
	p->top = fmax(p->top, to.y);
}

/* The same through a bottom corner; these leave downward. */
static void bottom_corner(struct plan *p, const char *outer, const char *inner,
			  bool right)
{
	const struct gp_figure_frame *f = &p->fr;
	double W = f->W, S = f->S, G = f->G, sv = f->sv;
	int io = part_index(p->unit, outer ? outer : "");
	int ii = part_index(p->unit, inner);
	if (ii < 0)
		return;
	bool two = io >= 0;
	double d = two ? p->delta : 0;
	double vch = S + G / 2;
	struct pt mo = two ? edge_middle(p, &p->unit->parts[io].poly[0], false)
			   : (struct pt){ 0, 0 };
	if (p->row->figure.ends == GP_ENDS_SQUARE) {
		/* out along the channel over the bottom bar; on the right it
		 * turns down at once, inside the point beside the digit */
		enum route_kind k = right ? ROUTE_DOWN : ROUTE_LEFT;
		struct route *ri = add_route(p, inner, 0, k);
		struct pt mi = edge_middle(p, &p->unit->parts[ii].poly[0], false);
		push(ri, (struct pt){ mi.x, mi.y + p->w });
		push(ri, (struct pt){ mi.x, vch + d });
		if (right && ri) {
			/* between the digit and its point: in the middle
			 * if the point is closer than keep */
			ri->u_down = W + fmin((p->keep + p->w / 2) * f->sec,
					      (point_left(p) - W) / 2);
			push(ri, P(p, ri->u_down, vch + d));
			note_down(p, ri);
		}
		if (two) {
			struct route *ro = add_route(p, outer, 0, k);
			push(ro, (struct pt){ mo.x, mo.y + p->w });
			push(ro, (struct pt){ mo.x, vch - d });
		}
		return;
	}
	struct pt outer_corner = P(p, right ? W : 0, 0);
	struct pt inner_corner = P(p, right ? W - sv : sv, S);
	struct line g = line_through(inner_corner, outer_corner);
	struct pt bottom_side = P(p, W / 2, 0);
	struct line lo = line_offset(g, bottom_side, d);
	struct line li = line_offset(g, bottom_side, -d);
	struct route *ri = add_route(p, inner, 0, ROUTE_DOWN);
	struct pt si = inside_near(p, &p->unit->parts[ii].poly[0], inner_corner);
	push(ri, si);
	push(ri, foot(li, si));
	struct pt ti = leave_down(p, li);
	push(ri, ti);
	if (ri)
		ri->u_down = upright(p, ti);
	note_down(p, ri);
	if (!two)
		return;
	struct route *ro = add_route(p, outer, 0, ROUTE_DOWN);
	struct line ch = { { 0, vch }, { 1, 0 } };
	push(ro, (struct pt){ mo.x, mo.y + p->w });
	push(ro, (struct pt){ mo.x, vch });
	push(ro, line_meet(ch, lo));
	struct pt to = leave_down(p, lo);
	push(ro, to);
	if (ro)
		ro->u_down = upright(p, to);
	note_down(p, ro);
}

static void figure_routes(struct plan *p)
{
	const struct gp_figure_frame *f = &p->fr;
	double W = f->W, H = f->H, S = f->S, G = f->G, sv = f->sv;
	double lower = (S + f->mlo) / 2, upper = (f->mtop + H - S) / 2;
	double gin = G * f->sec + S / 2; /* into the middle bar from its end */
	enum gp_figure fig = p->row->figure.figure;
	side_stub(p, "e", 0, false, sv / 2, lower);
	side_stub(p, "f", 0, false, sv / 2, upper);
	side_stub(p, "c", 0, true, W - sv / 2, lower);
	side_stub(p, "b", 0, true, W - sv / 2, upper);
	side_stub(p, "g", 0, true, W - sv - gin, f->mc);
	side_stub(p, "g1", 0, false, sv + gin, f->mc);
	side_stub(p, "g2", 0, true, W - sv - gin, f->mc);
	top_corner(p, "i", "h", false);
	top_corner(p, NULL, "j", true);
	bottom_corner(p, fig == GP_FIGURE_14 ? "l" : NULL, "k", false);
	bottom_corner(p, NULL, "m", true);
	if (fig == GP_FIGURE_16) {
		down(p, "l", 0, f->cc, lower);
	}
	/* bottom bars straight down */
	static const char *const bottoms[] = { "d", "d1", "d2" };
	double at[3] = { W / 2, f->cc / 2, (f->cc + W) / 2 };
	for (int i = 0; i < 3; i++) {
		int k = part_index(p->unit, bottoms[i]);
		if (k >= 0)
			down(p, bottoms[i], 0, at[i], S / 2);
	}
}

/* The top bars go over the top, above every corner lead-in. */
static void over_the_top(struct plan *p)
{
	const struct gp_figure_frame *f = &p->fr;
	double v = fmax(f->H + p->keep + p->w / 2, p->top + p->pitch);
	static const char *const names[] = { "a", "a1", "a2" };
	for (int i = 0; i < 3; i++) {
		bool right = i == 2;
		double u = right ? f->W - f->sv - f->S : f->sv + f->S;
		struct route *r = add_route(p, names[i], 0,
					    right ? ROUTE_RIGHT : ROUTE_LEFT);
		push(r, P(p, u, f->H - f->S / 2));
		push(r, P(p, u, v));
	}
}

static struct pt centre_of(const struct plan *p, const struct gp_polygon *poly)
{
	struct gp_box b = gp_polygon_bounds(poly);
	return rel(p, (struct gp_point){ b.x0 / 2 + b.x1 / 2, b.y0 / 2 + b.y1 / 2 });
}

/* Point, colon and sign parts. */
static void extra_routes(struct plan *p)
{
	const struct gp_figure_frame *f = &p->fr;
	int k = part_index(p->unit, "dp");
	if (k >= 0) {
		struct pt c = centre_of(p, &p->unit->parts[k].poly[0]);
		down(p, "dp", 0, upright(p, c), c.y);
		struct gp_box b = gp_polygon_bounds(&p->unit->parts[k].poly[0]);
		double r = (double)(b.x1 - b.x0) / 2;
		p->right_edge = fmax(p->right_edge, upright(p, c) + r +
						 (p->keep - p->sp) * f->sec);
	}
	k = part_index(p->unit, "colon");
	if (k >= 0) {
		struct pt lo = centre_of(p, &p->unit->parts[k].poly[0]);
		struct pt hi = centre_of(p, &p->unit->parts[k].poly[1]);
		double r = (double)p->row->colon_size / 2;
		/* beyond the lanes: not noted, the lanes stay inside it */
		struct route *rl = add_route(p, "colon", 0, ROUTE_DOWN);
		push(rl, lo);
		if (rl)
			rl->u_down = upright(p, lo);
		double u = upright(p, hi) + (r + p->keep + p->w / 2) * f->sec;
		struct route *rt = add_route(p, "colon", 1, ROUTE_DOWN);
		push(rt, hi);
		push(rt, P(p, u, hi.y));
		if (rt)
			rt->u_down = u;
	}
	if (part_index(p->unit, "minus") >= 0)
		down(p, "minus", 0, f->W / 2, f->m);
	side_stub(p, "one", 1, true, f->W - f->sv / 2, (f->S + f->mlo) / 2);
	side_stub(p, "one", 0, true, f->W - f->sv / 2,
		  (f->mtop + f->H - f->S) / 2);
}

/* --- lanes and the lower ends ------------------------------------------------ */

static double last_y(const struct route *r)
{
	return r->n ? r->pts[r->n - 1].y : 0;
}

/* Lanes by the height at which their lead-ins leave: lowest innermost. */
static void assign_lanes(struct plan *p, enum route_kind kind)
{
	int lane = 0;
	for (;;) {
		int best = -1;
		for (int i = 0; i < p->n; i++) {
			struct route *r = &p->routes[i];
			if (r->kind != kind || r->lane)
				continue;
			if (best < 0 || last_y(r) < last_y(&p->routes[best]))
				best = i;
		}
		if (best < 0)
			return;
		p->routes[best].lane = ++lane;
	}
}

static double lane_u(const struct plan *p, enum route_kind kind, int lane)
{
	double off = (p->w / 2 + (lane - 1) * p->pitch) * p->fr.sec;
	/* clear of the figure (and the point) by keep, of lead-ins going
	 * down beside it by the space */
	if (kind == ROUTE_LEFT)
		return fmin(-p->keep * p->fr.sec,
			    p->left_edge - (p->w / 2 + p->sp) * p->fr.sec) - off;
	return fmax(p->fr.W + p->keep * p->fr.sec,
		    p->right_edge + (p->w / 2 + p->sp) * p->fr.sec) + off;
}

/* Where the lead-ins end: clear of the unit's parts by keep and of the
 * lead-ins' own bends by the space. */
static double collect_v(const struct plan *p)
{
	double low = 0;
	for (int i = 0; i < p->unit->part_count; i++) {
		const struct gp_digit_part *part = &p->unit->parts[i];
		for (int k = 0; k < part->poly_count; k++) {
			struct gp_box b = gp_polygon_bounds(&part->poly[k]);
			low = fmin(low, (double)(b.y0 - p->unit->origin.y));
		}
	}
	double v = low - p->keep;
	for (int i = 0; i < p->n; i++)
		for (int k = 1; k < p->routes[i].n; k++)
			v = fmin(v, p->routes[i].pts[k].y - p->w / 2 - p->sp);
	return v - p->w / 2;
}

/* The lead-in of route r as a thick line ending at v_col. */
static void finish_route(struct plan *p, struct route *r)
{
	if (r->kind == ROUTE_DOWN) {
		push(r, P(p, r->u_down, p->v_col));
		return;
	}
	double u = lane_u(p, r->kind, r->lane);
	double v = last_y(r);
	push(r, P(p, u, v));
	push(r, P(p, u, p->v_col));
}

/* --- thick lines ------------------------------------------------------------ */

/* The outline of a line of width w along pts (mitred corners, square ends
 * at the end points), in the glass frame. */
static bool thick_line(const struct pt *pts, int n, double w,
		       struct gp_point origin, struct gp_polygon *out)
{
	struct pt left[ROUTE_MAX_POINTS + 2], right[ROUTE_MAX_POINTS + 2];
	struct pt q[ROUTE_MAX_POINTS + 2];
	int m = 0;
	for (int i = 0; i < n; i++)
		if (m == 0 || hypot(pts[i].x - q[m - 1].x, pts[i].y - q[m - 1].y) > 0.5)
			q[m++] = pts[i];
	gp_polygon_init(out);
	if (m < 2)
		return true;
	double h = w / 2;
	for (int i = 0; i < m; i++) {
		struct pt n0 = { 0, 0 }, n1 = { 0, 0 };
		if (i > 0) {
			double dx = q[i].x - q[i - 1].x, dy = q[i].y - q[i - 1].y;
			double l = hypot(dx, dy);
			n0 = (struct pt){ -dy / l, dx / l };
		}
		if (i < m - 1) {
			double dx = q[i + 1].x - q[i].x, dy = q[i + 1].y - q[i].y;
			double l = hypot(dx, dy);
			n1 = (struct pt){ -dy / l, dx / l };
		}
		if (i == 0)
			n0 = n1;
		if (i == m - 1)
			n1 = n0;
		double k = h / (1 + n0.x * n1.x + n0.y * n1.y);
		struct pt mit = { (n0.x + n1.x) * k, (n0.y + n1.y) * k };
		left[i] = (struct pt){ q[i].x + mit.x, q[i].y + mit.y };
		right[i] = (struct pt){ q[i].x - mit.x, q[i].y - mit.y };
	}
	for (int i = 0; i < m; i++)
		if (!gp_ring_push(&out->outer, origin.x + llround(right[i].x),
				  origin.y + llround(right[i].y)))
			return false;
	for (int i = m - 1; i >= 0; i--)
		if (!gp_ring_push(&out->outer, origin.x + llround(left[i].x),
				  origin.y + llround(left[i].y)))
			return false;
	gp_ring_clean(&out->outer);
	gp_polygon_normalize(out);
	return true;
}

bool gp_digit_thick_line(const struct gp_point *pts, size_t n, int64_t width,
			 struct gp_polygon *out)
{
	struct pt q[ROUTE_MAX_POINTS];
	if (n > ROUTE_MAX_POINTS)
		n = ROUTE_MAX_POINTS;
	for (size_t i = 0; i < n; i++)
		q[i] = (struct pt){ (double)(pts[i].x - pts[0].x),
				    (double)(pts[i].y - pts[0].y) };
	return thick_line(q, (int)n, (double)width, pts[0], out);
}

/* --- assignment --------------------------------------------------------------- */

/* Parts in the order their lead-ins end, left to right. */
static void order_parts(struct plan *p)
{
	int idx[GP_UNIT_MAX_TRACES];
	for (int i = 0; i < p->n; i++)
		idx[i] = i;
	for (int i = 1; i < p->n; i++)
		for (int k = i; k > 0; k--) {
			struct route *a = &p->routes[idx[k - 1]];
			struct route *b = &p->routes[idx[k]];
			double ua = upright(p, a->pts[a->n - 1]);
			double ub = upright(p, b->pts[b->n - 1]);
			if (ua <= ub)
				break;
			int t = idx[k - 1];
			idx[k - 1] = idx[k];
			idx[k] = t;
		}
	struct gp_digit_unit *u = p->unit;
	int count = 0;
	for (int i = 0; i < p->n; i++) {
		int part = p->routes[idx[i]].part;
		bool seen = false;
		for (int k = 0; k < count; k++)
			seen |= u->order[k] == part;
		if (!seen)
			u->order[count++] = part;
	}
}

static void documented(const struct gp_digits *row, struct gp_digit_unit *u)
{
	int duty = row->duty, n = u->part_count;
	u->line_count = (n + duty - 1) / duty;
	for (int run = 0; run < u->line_count; run++) {
		int first = run * duty, last = first + duty;
		if (last > n)
			last = n;
		/* commons from the top down within the run */
		for (int c = 1; c <= last - first; c++) {
			int best = -1;
			for (int k = first; k < last; k++) {
				struct gp_digit_part *part = &u->parts[u->order[k]];
				if (part->common)
					continue;
				if (best < 0 || part->height >
							u->parts[u->order[best]].height)
					best = k;
			}
			u->parts[u->order[best]].common = c;
			u->parts[u->order[best]].line = run + 1;
		}
	}
}

static const struct gp_digit_pair *find_pair(const struct gp_digits *row,
					     const char *name)
{
	for (size_t i = 0; i < row->pair_count; i++)
		if (strcmp(row->pairs[i].part, name) == 0)
			return &row->pairs[i];
	return NULL;
}

/* An explicit assignment: every part a pair, no pair twice, lines
 * numbered from 1 without holes, each line's lead-ins neighbours. */
static bool explicit_pairs(const struct gp_digits *row, struct gp_digit_unit *u,
			   struct gp_diag *diag)
{
	char label[32];
	gp_digit_unit_label(u, label, sizeof(label));
	const struct gp_where *w = &row->drive_where;
	int most = 0;
	for (int i = 0; i < u->part_count; i++) {
		struct gp_digit_part *part = &u->parts[i];
		const struct gp_digit_pair *pair = find_pair(row, part->name);
		if (!pair)
			return gp_diag_error(diag, w,
					     "digits '%s': the assignment gives "
					     "no (common, line) pair for '%s' "
					     "of %s; expected one for every "
					     "segment, point and colon",
					     row->name, part->name, label);
		part->common = pair->common;
		part->line = pair->line;
		most = part->line > most ? part->line : most;
		for (int k = 0; k < i; k++)
			if (u->parts[k].common == part->common &&
			    u->parts[k].line == part->line)
				return gp_diag_error(
					diag, &pair->where,
					"digits '%s': '%s' and '%s' are both "
					"given common %d, line %d; each "
					"segment needs a pair of its own",
					row->name, u->parts[k].name, part->name,
					part->common, part->line);
	}
	for (int line = 1; line <= most; line++) {
		int first = -1, last = -1, count = 0;
		for (int k = 0; k < u->part_count; k++)
			if (u->parts[u->order[k]].line == line) {
				if (first < 0)
					first = k;
				last = k;
				count++;
			}
		if (count == 0)
			return gp_diag_error(diag, w,
					     "digits '%s': no segment of %s is "
					     "on line %d, but line %d is used; "
					     "number the lines from 1 without "
					     "gaps",
					     row->name, label, line, most);
		if (last - first + 1 != count) {
			char order[GP_UNIT_MAX_PARTS * 8] = "";
			for (int k = 0; k < u->part_count; k++) {
				size_t n = strlen(order);
				snprintf(order + n, sizeof(order) - n, "%s%s",
					 k ? " " : "", u->parts[u->order[k]].name);
			}
			const char *in = "";
			for (int k = first; k <= last; k++)
				if (u->parts[u->order[k]].line != line)
					in = u->parts[u->order[k]].name;
			return gp_diag_error(
				diag, w,
				"digits '%s': line %d of %s joins '%s' and "
				"'%s', but the lead-in of '%s' (another line) "
				"reaches the lower edge between them, so the "
				"lines would have to cross; give line %d "
				"segments whose lead-ins are neighbours (left "
				"to right: %s)",
				row->name, line, label,
				u->parts[u->order[first]].name,
				u->parts[u->order[last]].name, in, line, order);
		}
	}
	u->line_count = most;
	return true;
}

/* --- bars, ports, traces ------------------------------------------------------- */

static bool add_trace(struct gp_digit_unit *u, const struct pt *pts, int n,
		      double w, int part, int poly, int line, double u_end)
{
	if (u->trace_count == GP_UNIT_MAX_TRACES)
		return false;
	struct gp_digit_trace *t = &u->traces[u->trace_count];
	if (!thick_line(pts, n, w, u->origin, &t->poly))
		return false;
	t->part = part;
	t->piece = poly;
	t->part2 = -1;
	t->line = line;
	t->u_end = u_end;
	u->trace_count++;
	return true;
}

static bool add_port(struct gp_digit_row *out, struct gp_point at, int64_t w,
		     int unit, int line)
{
	struct gp_digit_port *ports =
		realloc(out->ports, (out->port_count + 1) * sizeof(*ports));
	if (!ports)
		return false;
	out->ports = ports;
	ports[out->port_count++] = (struct gp_digit_port){ -1, unit, line, at, w };
	return true;
}

/* Lead-ins as traces; for each line a bar joining its lead-ins and a drop
 * from the middle one to the lower edge. */
static bool make_traces(struct plan *p, struct gp_digit_row *out, size_t unit)
{
	struct gp_digit_unit *u = p->unit;
	for (int i = 0; i < p->n; i++) {
		struct route *r = &p->routes[i];
		int line = u->parts[r->part].line;
		if (!add_trace(u, r->pts, r->n, p->w, r->part, r->poly, line,
			       upright(p, r->pts[r->n - 1])))
			return false;
	}
	for (int line = 1; line <= u->line_count; line++) {
		double lo = INFINITY, hi = -INFINITY;
		double ends[GP_UNIT_MAX_TRACES];
		int n = 0;
		for (int i = 0; i < p->n; i++) {
			struct route *r = &p->routes[i];
			if (u->parts[r->part].line != line)
				continue;
			double e = r->pts[r->n - 1].x;
			ends[n++] = e;
			lo = fmin(lo, e);
			hi = fmax(hi, e);
		}
		if (n == 0)
			continue;
		/* the middle lead-in carries on down */
		for (int i = 1; i < n; i++)
			for (int k = i; k > 0 && ends[k - 1] > ends[k]; k--) {
				double t = ends[k];
				ends[k] = ends[k - 1];
				ends[k - 1] = t;
			}
		double x = ends[(n - 1) / 2];
		double dv = p->v_end - p->v_col;
		struct pt drop[2] = { { x, p->v_col }, { x + dv * p->fr.t, p->v_end } };
		if (!add_trace(u, drop, 2, p->w, -1, 0, line, upright(p, drop[1])))
			return false;
		if (n > 1) {
			/* from centre to centre of the outer lead-ins: a
			 * neighbouring line's bar stays a full pitch away */
			struct pt bar[2] = { { lo, p->v_col }, { hi, p->v_col } };
			if (!add_trace(u, bar, 2, p->w, -1, 0, line, upright(p, drop[1])))
				return false;
		}
		struct gp_point at = { u->origin.x + llround(drop[1].x),
				       u->origin.y + llround(drop[1].y) };
		if (!add_port(out, at, (int64_t)p->w, (int)unit, line))
			return false;
	}
	return true;
}

bool gp_digits_grid(const struct gp_digits *row)
{
	uint64_t all = row->count >= 64 ? ~UINT64_C(0)
					: (UINT64_C(1) << row->count) - 1;
	return row->figure.figure == GP_FIGURE_7 && row->duty == 4 &&
	       !row->pairs && !row->minus && !row->one && !row->colon_mask &&
	       (row->point_mask & all) == all;
}

/* A bridge of the segment plate across the gap line p q at fraction t,
 * from inside part a to inside part b. */
static bool grid_bridge(struct plan *p, const char *a, const char *b,
			struct pt gp, struct pt gq, double t)
{
	struct gp_digit_unit *u = p->unit;
	int ia = part_index(u, a), ib = part_index(u, b);
	struct pt m = { gp.x + t * (gq.x - gp.x), gp.y + t * (gq.y - gp.y) };
	struct line l = line_through(gp, gq);
	struct pt ra = centre_of(p, &u->parts[ia].poly[0]);
	struct pt n = { -l.d.y, l.d.x };
	if (n.x * (ra.x - m.x) + n.y * (ra.y - m.y) < 0)
		n = (struct pt){ -n.x, -n.y };
	double reach = p->fr.G / 2 + 2.5 * p->w;
	struct pt pts[2] = { { m.x + n.x * reach, m.y + n.y * reach },
			     { m.x - n.x * reach, m.y - n.y * reach } };
	if (!add_trace(u, pts, 2, p->w, ia, 0, u->parts[ia].line, 0))
		return false;
	u->traces[u->trace_count - 1].part2 = ib;
	return true;
}

static bool grid_unit(struct plan *p, struct gp_digit_row *out, size_t index)
{
	const struct gp_figure_frame *f = &p->fr;
	struct gp_digit_unit *u = p->unit;
	double W = f->W, H = f->H, S = f->S, G = f->G, sv = f->sv;
	static const char *const order[] = { "a", "f", "e", "d",
					     "dp", "c", "g", "b" };
	for (int k = 0; k < 8; k++)
		u->order[k] = part_index(u, order[k]);
	documented(p->row, u);
	int dp = part_index(u, "dp");
	struct pt c = centre_of(p, &u->parts[dp].poly[0]);
	struct pt mr = P(p, W - sv / 2, f->m), ml = P(p, sv / 2, f->m);
	(void)ml;
	bool ok;
	/* the f-e link a third of the way in from the outer side */
	struct pt fe0 = P(p, sv / 3, f->mc), fe1 = P(p, sv / 3 + 1, f->mc);
	if (p->row->figure.ends == GP_ENDS_BEVELLED) {
		ok = grid_bridge(p, "a", "f", P(p, 0, H), P(p, sv, H - S), 0.5) &&
		     grid_bridge(p, "f", "e", fe0, fe1, 0) &&
		     grid_bridge(p, "e", "d", P(p, 0, 0), P(p, sv, S), 0.5) &&
		     grid_bridge(p, "b", "g", P(p, W - sv, f->mtop), mr, 0.5) &&
		     grid_bridge(p, "g", "c", P(p, W - sv, f->mlo), mr, 0.5);
	} else {
		double vt = H - S - G / 2, vb = S + G / 2;
		double ug = W - sv - G * f->sec / 2;
		double vbg = (f->mc + G / 2 + f->mtop) / 2;
		double vgc = (f->mlo + f->mc - G / 2) / 2;
		ok = grid_bridge(p, "a", "f", P(p, sv / 2, vt),
				 P(p, sv / 2 + 1, vt), 0) &&
		     grid_bridge(p, "f", "e", fe0, fe1, 0) &&
		     grid_bridge(p, "e", "d", P(p, sv / 2, vb),
				 P(p, sv / 2 + 1, vb), 0) &&
		     grid_bridge(p, "b", "g", P(p, ug, vbg), P(p, ug, vbg + 1), 0) &&
		     grid_bridge(p, "g", "c", P(p, ug, vgc), P(p, ug, vgc + 1), 0);
	}
	if (!ok)
		return false;
	/* c to the point, from well inside c */
	struct pt cd[2] = { P(p, W - sv / 3, S + G + S / 2), c };
	if (!add_trace(u, cd, 2, p->w, part_index(u, "c"), 0, 2, 0))
		return false;
	u->traces[u->trace_count - 1].part2 = dp;
	/* the ports: under them COM4 runs at v4 */
	double r = (double)p->row->point_size / 2;
	double v4 = -(p->keep + p->w / 2);
	p->v_end = v4 - p->w - p->keep;
	double ud = W / 2, up = upright(p, c) + r / 3;
	struct pt d1[2] = { P(p, ud, S / 2), P(p, ud, p->v_end) };
	struct pt d2[2] = { P(p, up, c.y), P(p, up, p->v_end) };
	if (!add_trace(u, d1, 2, p->w, part_index(u, "d"), 0, 1,
		       upright(p, d1[1])) ||
	    !add_trace(u, d2, 2, p->w, dp, 0, 2, upright(p, d2[1])))
		return false;
	struct gp_point a1 = { u->origin.x + llround(d1[1].x),
			       u->origin.y + llround(d1[1].y) };
	struct gp_point a2 = { u->origin.x + llround(d2[1].x),
			       u->origin.y + llround(d2[1].y) };
	return add_port(out, a1, (int64_t)p->w, (int)index, 1) &&
	       add_port(out, a2, (int64_t)p->w, (int)index, 2);
}

/* --- bands ------------------------------------------------------------------- */

/* Multiplexed rows (but the grid above) are laid out as bands and walls.
 * Each common is a band on the common plate: the back patches of its parts
 * in every unit, joined inside a unit by back links across the gaps (or a
 * counter) between them and from unit to unit by links beside the digits.
 * Each segment line is a wall on the segment plate: a chain of parts, one
 * per band from some band down to the lowest, joined by front links, that
 * leaves the unit downward.  A wall crosses a band only inside its own
 * part there, so neither plate crosses the other outside the pixels; a
 * band passes over the top of a wall that starts below it.  The walls of
 * a unit are listed left to right, each from the top down; the bands'
 * parts are then taken wall by wall, so the order of the list is the
 * electrode layout and the assignment at once: line = wall, common =
 * band.  A colon is a wall of its own in the lowest band, standing
 * between its two digits, which the other bands pass over. */

struct scheme {
	enum gp_figure figure;
	int duty;
	bool point;
	/* walls left to right: "part/common ..." from the top down */
	const char *walls[GP_UNIT_MAX_PARTS];
};

static const struct scheme schemes[] = {
	{ GP_FIGURE_7, 3, true, { "a/1 f/2 e/3", "g/2 d/3", "b/1 c/2 dp/3" } },
	{ GP_FIGURE_7, 3, false, { "a/1 f/2 e/3", "g/2 d/3", "b/2 c/3" } },
	{ GP_FIGURE_7, 4, true, { "a/1 f/2 e/3 d/4", "b/1 g/2 c/3 dp/4" } },
	{ GP_FIGURE_7, 4, false, { "a/1 f/2 e/3 d/4", "b/2 g/3 c/4" } },
};

#define WALL_MAX GP_DIGITS_MAX_DUTY

struct wall {
	int part[WALL_MAX];       /* top down */
	int count;
};

struct bands {
	struct wall walls[GP_UNIT_MAX_PARTS];
	int count;
};

static const struct scheme *find_scheme(const struct gp_digits *row,
					bool point)
{
	for (size_t i = 0; i < sizeof(schemes) / sizeof(*schemes); i++)
		if (schemes[i].figure == row->figure.figure &&
		    schemes[i].duty == row->duty && schemes[i].point == point)
			return &schemes[i];
	return NULL;
}

bool gp_digits_banded(const struct gp_digits *row)
{
	if (row->duty < 2 || row->pairs || gp_digits_grid(row))
		return false;
	uint64_t all = row->count >= 64 ? ~UINT64_C(0)
					: (UINT64_C(1) << row->count) - 1;
	bool some = (row->point_mask & all) != 0;
	bool none = (row->point_mask & all) != all;
	return (!some || find_scheme(row, true)) &&
	       (!none || find_scheme(row, false));
}

/* One wall "a/1 f/2" into parts; false when a part is missing. */
static bool parse_wall(struct gp_digit_unit *u, const char *text, int line,
		       struct wall *w)
{
	char buffer[128];
	snprintf(buffer, sizeof(buffer), "%s", text);
	w->count = 0;
	for (char *save = NULL, *tok = strtok_r(buffer, " ", &save); tok;
	     tok = strtok_r(NULL, " ", &save)) {
		char *slash = strchr(tok, '/');
		if (!slash || w->count == WALL_MAX)
			return false;
		*slash = '\0';
		int k = part_index(u, tok);
		if (k < 0)
			return false;
		u->parts[k].common = atoi(slash + 1);
		u->parts[k].line = line;
		w->part[w->count++] = k;
	}
	return w->count > 0;
}

/* The sign unit: the "1" over the minus in the two lowest bands. */
static void sign_walls(const struct gp_digits *row, struct gp_digit_unit *u,
		       struct bands *b)
{
	int one = part_index(u, "one"), minus = part_index(u, "minus");
	struct wall *w = &b->walls[b->count++];
	w->count = 0;
	int n = row->duty;
	if (one >= 0) {
		u->parts[one].common = minus >= 0 ? n - 1 : n;
		u->parts[one].line = 1;
		w->part[w->count++] = one;
	}
	if (minus >= 0) {
		u->parts[minus].common = n;
		u->parts[minus].line = 1;
		w->part[w->count++] = minus;
	}
}

static bool band_walls(const struct gp_digits *row, struct gp_digit_unit *u,
		       struct bands *b, struct gp_diag *diag)
{
	b->count = 0;
	int colon = part_index(u, "colon");
	if (u->number == 0) {
		sign_walls(row, u, b);
	} else {
		bool point = part_index(u, "dp") >= 0;
		const struct scheme *sc = find_scheme(row, point);
		if (!sc)
			return gp_diag_error(diag, &row->where,
					     "digits '%s': no band layout for "
					     "%zu-segment digits %s a point at "
					     "1/%d duty",
					     row->name,
					     gp_figure_segment_count(row->figure.figure),
					     point ? "with" : "without",
					     row->duty);
		for (int i = 0; sc->walls[i]; i++)
			if (!parse_wall(u, sc->walls[i], i + 1, &b->walls[b->count++]))
				return gp_diag_error(diag, NULL,
						     "digits: band layout '%s' "
						     "names a part the digit "
						     "lacks", sc->walls[i]);
	}
	if (colon >= 0) {
		struct wall *w = &b->walls[b->count++];
		u->parts[colon].common = row->duty;
		u->parts[colon].line = b->count;
		w->part[0] = colon;
		w->count = 1;
	}
	u->line_count = b->count;
	return true;
}

static bool is_named(const struct plan *p, int part, const char *name)
{
	return strcmp(p->unit->parts[part].name, name) == 0;
}

/* A back link of the unit: a line `w` wide along pts (upright frame). */
static bool add_back(struct plan *p, const struct pt *pts, int n, int common)
{
	struct gp_digit_unit *u = p->unit;
	if (u->back_count == GP_UNIT_MAX_TRACES)
		return false;
	struct gp_digit_back *b = &u->backs[u->back_count];
	if (!thick_line(pts, n, p->w, u->origin, &b->poly))
		return false;
	b->common = common;
	u->back_count++;
	return true;
}

static double seg_point_distance(struct pt a, struct pt b, struct pt q,
				 struct pt *at)
{
	double dx = b.x - a.x, dy = b.y - a.y, l2 = dx * dx + dy * dy;
	double t = l2 > 0 ? ((q.x - a.x) * dx + (q.y - a.y) * dy) / l2 : 0;
	t = fmax(0, fmin(1, t));
	*at = (struct pt){ a.x + t * dx, a.y + t * dy };
	return hypot(q.x - at->x, q.y - at->y);
}

/* A link across the gap between two neighbouring parts: from the middle
 * of the longest stretch where an edge of x runs parallel to an edge of y
 * at about the gap, straight across.  False when they share no gap. */
static bool gap_link_at(const struct plan *p, const struct gp_polygon *x,
			const struct gp_polygon *y, double at, struct pt out[2])
{
	const struct gp_ring *rx = &x->outer, *ry = &y->outer;
	double best = 2 * p->w, G = p->fr.G;
	bool found = false;
	for (size_t i = 0; i < rx->count; i++) {
		struct pt a = rel(p, rx->points[i]);
		struct pt b = rel(p, rx->points[(i + 1) % rx->count]);
		double lx = hypot(b.x - a.x, b.y - a.y);
		if (lx < 1)
			continue;
		struct pt d = { (b.x - a.x) / lx, (b.y - a.y) / lx };
		for (size_t k = 0; k < ry->count; k++) {
			struct pt c = rel(p, ry->points[k]);
			struct pt e = rel(p, ry->points[(k + 1) % ry->count]);
			double ly = hypot(e.x - c.x, e.y - c.y);
			if (ly < 1)
				continue;
			struct pt f = { (e.x - c.x) / ly, (e.y - c.y) / ly };
			if (fabs(d.x * f.y - d.y * f.x) > 0.02)
				continue;
			/* signed distance of y's edge from x's, along the
			 * normal */
			double nc = -d.y * (c.x - a.x) + d.x * (c.y - a.y);
			if (fabs(nc) < 0.5 * G || fabs(nc) > 1.5 * G)
				continue;
			double t0 = (c.x - a.x) * d.x + (c.y - a.y) * d.y;
			double t1 = (e.x - a.x) * d.x + (e.y - a.y) * d.y;
			double lo = fmax(0, fmin(t0, t1)), hi = fmin(lx, fmax(t0, t1));
			if (hi - lo <= best)
				continue;
			best = hi - lo;
			found = true;
			double tm = lo + at * (hi - lo), s = nc > 0 ? 1 : -1;
			double reach = 2.5 * p->w;
			struct pt m = { a.x + d.x * tm, a.y + d.y * tm };
			struct pt n = { -d.y * s, d.x * s };
			out[0] = (struct pt){ m.x - n.x * reach, m.y - n.y * reach };
			out[1] = (struct pt){ m.x + n.x * (fabs(nc) + reach),
					      m.y + n.y * (fabs(nc) + reach) };
		}
	}
	return found;
}

static bool gap_link(const struct plan *p, const struct gp_polygon *x,
		     const struct gp_polygon *y, struct pt out[2])
{
	return gap_link_at(p, x, y, 0.5, out);
}

/* The "1" of the sign unit: its two uprights joined across their gap on
 * both plates, a quarter of the way along it from either end. */
static bool one_links(struct plan *p, int k)
{
	struct gp_digit_unit *u = p->unit;
	struct pt f[2], b[2];
	if (!gap_link_at(p, &u->parts[k].poly[0], &u->parts[k].poly[1], 0.25, f) ||
	    !gap_link_at(p, &u->parts[k].poly[0], &u->parts[k].poly[1], 0.75, b))
		return false;
	/* from piece 1 to piece 0 (part2's first) */
	if (!add_trace(u, f, 2, p->w, k, 1, u->parts[k].line, 0))
		return false;
	u->traces[u->trace_count - 1].part2 = k;
	return add_back(p, b, 2, u->parts[k].common);
}

/* The shortest way between two parts that are close but share no
 * parallel edge (a point beside its digit), reaching into both. */
static bool near_link(const struct plan *p, const struct gp_polygon *x,
		      const struct gp_polygon *y, struct pt out[2])
{
	double best = INFINITY;
	struct pt bx = { 0, 0 }, by = { 0, 0 };
	const struct gp_polygon *polys[2] = { x, y };
	for (int side = 0; side < 2; side++) {
		const struct gp_ring *r = &polys[side]->outer;
		const struct gp_ring *o = &polys[1 - side]->outer;
		for (size_t i = 0; i < r->count; i++) {
			struct pt q = rel(p, r->points[i]);
			for (size_t k = 0; k < o->count; k++) {
				struct pt at;
				double d = seg_point_distance(
					rel(p, o->points[k]),
					rel(p, o->points[(k + 1) % o->count]), q, &at);
				if (d < best) {
					best = d;
					bx = side ? at : q;
					by = side ? q : at;
				}
			}
		}
	}
	if (!(best < 3 * p->fr.G + (double)p->row->point_gap))
		return false;
	double dx = by.x - bx.x, dy = by.y - bx.y, l = hypot(dx, dy);
	if (l <= 0)
		return false;
	double reach = 2.5 * p->w;
	out[0] = (struct pt){ bx.x - dx / l * reach, bx.y - dy / l * reach };
	out[1] = (struct pt){ by.x + dx / l * reach, by.y + dy / l * reach };
	return true;
}


/* Special links: the bottom bar to the point under the baseline (as the
 * grid's COM4), the top bar over the figure down to the point. */
static int special_link(struct plan *p, int a, int b, bool front,
			struct pt *pts)
{
	const struct gp_figure_frame *f = &p->fr;
	double W = f->W, H = f->H, S = f->S, G = f->G, sv = f->sv;
	int dp = is_named(p, a, "dp") ? a : is_named(p, b, "dp") ? b : -1;
	if (dp < 0)
		return 0;
	int other = dp == a ? b : a;
	struct pt c = centre_of(p, &p->unit->parts[dp].poly[0]);
	double pu = upright(p, c), pv = c.y;
	double r = (double)p->row->point_size / 2;
	double v4 = -(p->keep + p->w / 2);
	if (!front && is_named(p, other, "d")) {
		double dr = W - sv - G - S / 2;
		pts[0] = P(p, dr, S / 2);
		pts[1] = P(p, dr, v4);
		pts[2] = P(p, pu - r / 3, v4);
		pts[3] = P(p, pu - r / 3, pv);
		return 4;
	}
	if (front && is_named(p, other, "a")) {
		double ua = W - sv / 2 - G - S + 2 * p->pitch;
		double v1 = H + p->keep + p->w / 2;
		pts[0] = P(p, ua, H - S / 2);
		pts[1] = P(p, ua, v1);
		pts[2] = P(p, pu, v1);
		pts[3] = P(p, pu, pv);
		return 4;
	}
	return 0;
}

/* Joins parts a and b of one wall (front) or band (back). */
static bool band_link(struct plan *p, int a, int b, bool front, int common)
{
	struct gp_digit_unit *u = p->unit;
	struct pt pts[ROUTE_MAX_POINTS];
	int n = special_link(p, a, b, front, pts);
	if (n == 0) {
		n = 2;
		const struct gp_polygon *x = &u->parts[a].poly[0];
		const struct gp_polygon *y = &u->parts[b].poly[0];
		if (!gap_link(p, x, y, pts) && !near_link(p, x, y, pts)) {
			/* across a counter, centre to centre */
			pts[0] = centre_of(p, x);
			pts[1] = centre_of(p, y);
		}
	}
	if (!front)
		return add_back(p, pts, n, common);
	if (!add_trace(u, pts, n, p->w, a, 0, u->parts[a].line, 0))
		return false;
	u->traces[u->trace_count - 1].part2 = b;
	return true;
}

/* The two dots of a colon: joined on the segment plate to the right of
 * their centres (where its wall then drops) and on the common plate to
 * the left. */
static bool colon_links(struct plan *p, int k)
{
	struct gp_digit_unit *u = p->unit;
	struct pt lo = centre_of(p, &u->parts[k].poly[0]);
	struct pt hi = centre_of(p, &u->parts[k].poly[1]);
	double r = (double)p->row->colon_size / 4;
	struct pt f[2] = { P(p, upright(p, hi) + r, hi.y),
			   P(p, upright(p, lo) + r, lo.y) };
	struct pt b[2] = { P(p, upright(p, hi) - r, hi.y),
			   P(p, upright(p, lo) - r, lo.y) };
	/* from piece 1 to piece 0 (part2's first) */
	if (!add_trace(u, f, 2, p->w, k, 1, u->parts[k].line, 0))
		return false;
	u->traces[u->trace_count - 1].part2 = k;
	return add_back(p, b, 2, u->parts[k].common);
}

/* Where a band leaves part k toward one side: pts from inside the part
 * to the unit's side (upright u = side).  0 when the part has no way out
 * there. */
static int exit_path(struct plan *p, int k, bool right, struct pt *pts)
{
	const struct gp_figure_frame *f = &p->fr;
	double W = f->W, H = f->H, S = f->S, G = f->G, sv = f->sv;
	double upper = (f->mtop + H - S) / 2, lower = (S + f->mlo) / 2;
	double side = right ? W + p->keep + p->w / 2 : -(p->keep + p->w / 2);
	double vtop = H + p->keep + p->w / 2 + p->pitch;
	double v4 = -(p->keep + p->w / 2);
	const char *name = p->unit->parts[k].name;
	bool sign = p->unit->number == 0;
	if (strcmp(name, "a") == 0) {
		double ua = right ? W - sv / 2 - G - S : sv / 2 + G + S;
		pts[0] = P(p, ua, H - S / 2);
		pts[1] = P(p, ua, vtop);
		pts[2] = P(p, side, vtop);
		return 3;
	}
	if (!right && (!strcmp(name, "f") || !strcmp(name, "e"))) {
		double v = name[0] == 'f' ? upper : lower;
		pts[0] = P(p, sv / 2, v);
		pts[1] = P(p, side, v);
		return 2;
	}
	if (right && (!strcmp(name, "b") || !strcmp(name, "c"))) {
		double v = name[0] == 'b' ? upper : lower;
		pts[0] = P(p, W - sv / 2, v);
		pts[1] = P(p, side, v);
		return 2;
	}
	if (!strcmp(name, "g") && !sign) {
		double ug = right ? W - sv - G * f->sec - S / 2
				  : sv + G * f->sec + S / 2;
		pts[0] = P(p, ug, f->mc);
		pts[1] = P(p, side, f->mc);
		return 2;
	}
	if (!strcmp(name, "d")) {
		double ud = right ? W - sv - G - S / 2
				  : (p->row->figure.ends == GP_ENDS_BEVELLED
					     ? sv + G + S / 2 : S);
		pts[0] = P(p, ud, S / 2);
		pts[1] = P(p, ud, v4);
		pts[2] = P(p, side, v4);
		return 3;
	}
	if (right && !strcmp(name, "dp")) {
		struct pt c = centre_of(p, &p->unit->parts[k].poly[0]);
		double r = (double)p->row->point_size / 2;
		pts[0] = c;
		pts[1] = P(p, upright(p, c) + r + p->keep + p->w / 2, c.y);
		return 2;
	}
	if (right && sign && !strcmp(name, "one")) {
		/* from its upper piece when the minus shares the unit */
		bool alone = part_index(p->unit, "minus") < 0;
		double v = alone ? lower : upper;
		pts[0] = P(p, W - sv / 2, v);
		pts[1] = P(p, side, v);
		return 2;
	}
	if (right && sign && !strcmp(name, "minus")) {
		if (part_index(p->unit, "one") < 0) {
			pts[0] = P(p, W / 2, f->m);
			pts[1] = P(p, side, f->m);
			return 2;
		}
		/* under the "1" */
		double um = W / 2 + S / 2;
		pts[0] = P(p, um, f->m);
		pts[1] = P(p, um, v4);
		pts[2] = P(p, side, v4);
		return 3;
	}
	return 0;
}

/* The drop of a wall from its lowest part k to v_end. */
static int drop_path(struct plan *p, int k, struct pt *pts)
{
	const struct gp_figure_frame *f = &p->fr;
	double W = f->W, S = f->S, G = f->G, sv = f->sv;
	const char *name = p->unit->parts[k].name;
	double ve = p->v_end;
	if (!strcmp(name, "d")) {
		pts[0] = P(p, W / 2, S / 2);
		pts[1] = P(p, W / 2, ve);
		return 2;
	}
	if (!strcmp(name, "dp") || !strcmp(name, "colon")) {
		struct pt c = centre_of(p, &p->unit->parts[k].poly[0]);
		int64_t size = name[0] == 'd' ? p->row->point_size
					      : p->row->colon_size;
		double u = upright(p, c) + (double)size / (name[0] == 'd' ? 6 : 4);
		pts[0] = P(p, u, c.y);
		pts[1] = P(p, u, ve);
		return 2;
	}
	if (!strcmp(name, "e") || !strcmp(name, "c")) {
		bool right = name[0] == 'c';
		double v = S + G + 2 * p->w;
		double u = right ? W - sv / 2 : sv / 2;
		double out = right ? W + p->keep + p->w / 2 + p->pitch
				   : -(p->keep + p->w / 2 + p->pitch);
		pts[0] = P(p, u, v);
		pts[1] = P(p, out, v);
		pts[2] = P(p, out, ve);
		return 3;
	}
	if (!strcmp(name, "minus")) {
		double u = (W / 2 + sv) / 2;
		pts[0] = P(p, u, f->m);
		pts[1] = P(p, u, ve);
		return 2;
	}
	if (!strcmp(name, "one")) {
		double lower = (S + f->mlo) / 2;
		pts[0] = P(p, W - sv / 2, lower);
		pts[1] = P(p, W - sv / 2, ve);
		return 2;
	}
	return 0;
}

static void note_reach(struct plan *p, const struct pt *pts, int n)
{
	struct gp_digit_unit *u = p->unit;
	for (int i = 0; i < n; i++) {
		double x = upright(p, pts[i]);
		u->reach_left = fmin(u->reach_left, x - p->w / 2);
		u->reach_right = fmax(u->reach_right, x + p->w / 2);
		if (pts[i].y > u->v_low) {
			u->reach_left_hi = fmin(u->reach_left_hi, x - p->w / 2);
			u->reach_right_hi = fmax(u->reach_right_hi, x + p->w / 2);
		}
	}
}

/* The exits of every band the unit holds: from the band's first part in
 * wall order to the left, from its last to the right. */
static bool band_exits(struct plan *p, const struct bands *b,
		       struct gp_diag *diag)
{
	struct gp_digit_unit *u = p->unit;
	for (int c = 1; c <= p->row->duty; c++) {
		int first = -1, last = -1;
		for (int i = 0; i < b->count; i++)
			for (int k = 0; k < b->walls[i].count; k++) {
				int part = b->walls[i].part[k];
				if (u->parts[part].common != c ||
				    is_named(p, part, "colon"))
					continue;
				if (first < 0)
					first = part;
				last = part;
			}
		if (first < 0)
			continue;
		for (int side = 0; side < 2; side++) {
			struct pt pts[ROUTE_MAX_POINTS];
			int part = side ? last : first;
			int n = exit_path(p, part, side == 1, pts);
			if (n == 0) {
				if (u->number == 0 && side == 0)
					continue; /* bands end at the sign */
				return gp_diag_error(
					diag, &p->row->where,
					"digits '%s': common %d cannot leave "
					"'%s' toward the %s", p->row->name, c,
					u->parts[part].name,
					side ? "right" : "left");
			}
			if (!add_back(p, pts, n, c))
				return false;
			note_reach(p, pts, n);
			struct gp_digit_exit *e = side ? &u->right[c - 1]
						       : &u->left[c - 1];
			*e = (struct gp_digit_exit){ true, upright(p, pts[n - 1]),
						     pts[n - 1].y };
		}
	}
	return true;
}

static bool band_drops(struct plan *p, const struct bands *b,
		       struct gp_digit_row *out, size_t index)
{
	struct gp_digit_unit *u = p->unit;
	for (int i = 0; i < b->count; i++) {
		const struct wall *w = &b->walls[i];
		int k = w->part[w->count - 1];
		struct pt pts[ROUTE_MAX_POINTS];
		int n = drop_path(p, k, pts);
		if (n == 0)
			return false;
		if (!is_named(p, k, "colon"))
			note_reach(p, pts, n);
		if (!add_trace(u, pts, n, p->w, k, 0, u->parts[k].line,
			       upright(p, pts[n - 1])))
			return false;
		struct gp_point at = { u->origin.x + llround(pts[n - 1].x),
				       u->origin.y + llround(pts[n - 1].y) };
		if (!add_port(out, at, (int64_t)p->w, (int)index, i + 1))
			return false;
	}
	return true;
}

/* The parts in wall order, for the firmware map and messages. */
static void band_order(struct gp_digit_unit *u, const struct bands *b)
{
	int n = 0;
	for (int i = 0; i < b->count; i++)
		for (int k = 0; k < b->walls[i].count; k++)
			u->order[n++] = b->walls[i].part[k];
}

static bool band_unit(struct plan *p, struct gp_digit_row *out, size_t index,
		      struct gp_diag *diag)
{
	struct gp_digit_unit *u = p->unit;
	struct bands b;
	if (!band_walls(p->row, u, &b, diag))
		return false;
	u->banded = true;
	u->pitch = p->pitch;
	u->lead = p->w;
	u->keep = p->keep;
	u->reach_left = u->reach_left_hi = 0;
	u->reach_right = u->reach_right_hi = p->fr.W;
	/* what reaches out below this (the point, side drops, the bottom
	 * bar's exits) does not bar links above it */
	u->v_low = p->fr.S + p->fr.G + 3 * p->w;
	band_order(u, &b);
	p->v_end = -(p->keep + p->w / 2) - p->w - p->keep;
	bool ok = true;
	/* walls: front links top down */
	for (int i = 0; ok && i < b.count; i++)
		for (int k = 0; ok && k + 1 < b.walls[i].count; k++)
			ok = band_link(p, b.walls[i].part[k],
				       b.walls[i].part[k + 1], true, 0);
	/* bands: back links wall by wall */
	for (int c = 1; ok && c <= p->row->duty; c++) {
		int prev = -1;
		for (int i = 0; ok && i < b.count; i++)
			for (int k = 0; ok && k < b.walls[i].count; k++) {
				int part = b.walls[i].part[k];
				if (u->parts[part].common != c ||
				    is_named(p, part, "colon"))
					continue;
				if (prev >= 0)
					ok = band_link(p, prev, part, false, c);
				prev = part;
			}
	}
	/* parts of two pieces: joined on both plates */
	for (int k = 0; ok && k < u->part_count; k++)
		if (u->parts[k].poly_count == 2)
			ok = is_named(p, k, "colon") ? colon_links(p, k)
						     : one_links(p, k);
	ok = ok && band_exits(p, &b, diag) && band_drops(p, &b, out, index);
	if (!ok && diag->errors == 0)
		gp_diag_error(diag, &p->row->where,
			      "digits '%s': the band layout of %s failed",
			      p->row->name, u->number ? "a digit" : "the sign unit");
	return ok;
}

static bool plan_unit(const struct gp_digits *row,
		      const struct gp_digit_rules *rules, struct gp_digit_unit *u,
		      struct gp_digit_row *out, size_t index, struct gp_diag *diag)
{
	struct plan *p = calloc(1, sizeof(*p));
	bool ok = false;
	if (!p)
		return gp_diag_oom(diag, NULL);
	p->row = row;
	p->rules = rules;
	p->unit = u;
	struct gp_figure_spec fs = row->figure;
	if (u->number == 0)
		fs.figure = GP_FIGURE_7;
	gp_figure_frame(&fs, &p->fr);
	/* 2 nm over the minimum so that rounding never makes it narrower */
	p->w = (double)rules->line + 2;
	p->sp = (double)rules->space;
	p->pitch = p->w + p->sp;
	p->delta = p->pitch / 2;
	p->keep = fmax(p->sp, 2 * sqrt(2.0) * (double)rules->registration + 2);
	p->left_edge = 0;
	p->right_edge = p->fr.W;
	p->top = p->fr.H;
	if (gp_digits_grid(row)) {
		ok = grid_unit(p, out, index);
		if (!ok)
			gp_diag_oom(diag, NULL);
		goto done;
	}
	if (gp_digits_banded(row)) {
		ok = band_unit(p, out, index, diag);
		goto done;
	}
	if (u->number > 0)
		figure_routes(p);
	extra_routes(p);
	over_the_top(p);
	if (p->overflow) {
		gp_diag_error(diag, &row->where, "digits '%s': too many "
			      "lead-ins in one unit", row->name);
		goto done;
	}
	assign_lanes(p, ROUTE_LEFT);
	assign_lanes(p, ROUTE_RIGHT);
	p->v_col = collect_v(p);
	p->v_end = p->v_col - p->w - p->sp;
	for (int i = 0; i < p->n; i++)
		finish_route(p, &p->routes[i]);
	order_parts(p);
	if (row->pairs) {
		if (!explicit_pairs(row, u, diag))
			goto done;
	} else {
		documented(row, u);
	}
	if (!make_traces(p, out, index)) {
		gp_diag_oom(diag, NULL);
		goto done;
	}
	ok = true;
done:
	free(p);
	return ok;
}


/* --- bands from unit to unit ------------------------------------------------- */

struct joiner {
	const struct gp_digits *row;
	struct gp_digit_unit *a;
	const struct gp_digit_unit *b;
	double t, dx;
	struct gp_diag *diag;
	double du;                /* upright u between two parallel upright
				   * leads side by side */
	double L, R, L_hi, R_hi;  /* where jogs may stand: beside everything
				   * of the two units, or of what is above
				   * their low parts */
};

/* Where the jog of a link between heights h1 and h2 may stand at the
 * earliest (from unit a) and the latest (toward unit b). */
static double base_left(const struct joiner *j, double h1, double h2)
{
	return fmin(h1, h2) > j->a->v_low + j->a->keep ? j->L_hi : j->L;
}

static double base_right(const struct joiner *j, double h1, double h2)
{
	return fmin(h1, h2) > j->b->v_low + j->a->keep ? j->R_hi : j->R;
}

static bool join_line(struct joiner *j, const struct pt *upr, int n, int common)
{
	struct gp_digit_unit *a = j->a;
	struct pt pts[ROUTE_MAX_POINTS];
	for (int i = 0; i < n; i++)
		pts[i] = (struct pt){ upr[i].x + upr[i].y * j->t, upr[i].y };
	if (a->back_count == GP_UNIT_MAX_TRACES)
		return gp_diag_error(j->diag, &j->row->where,
				     "digits '%s': too many links", j->row->name);
	struct gp_digit_back *bk = &a->backs[a->back_count];
	if (!thick_line(pts, n, a->lead, a->origin, &bk->poly))
		return gp_diag_error(j->diag, NULL, "out of memory");
	bk->common = common;
	a->back_count++;
	return true;
}

static bool no_room(struct joiner *j, const char *what)
{
	char label[32];
	gp_digit_unit_label(j->a, label, sizeof(label));
	return gp_diag_error(j->diag, &j->row->where,
			     "digits '%s': the commons cannot pass between "
			     "%s and the next digit%s: widen the pitch%s",
			     j->row->name, label, what,
			     *what ? " ('pitch' of the colon)" : "");
}

/* Commons between two units without a colon: each straight across, or
 * with one jog; jogs of links that climb go left to right from the top
 * band down, of links that fall right to left, so that none cross. */
static bool join_plain(struct joiner *j)
{
	double up = -INFINITY, down = INFINITY;
	const struct gp_digit_unit *a = j->a, *b = j->b;
	for (int c = 0; c < j->row->duty; c++) {
		if (!a->right[c].given || !b->left[c].given)
			continue;
		double h1 = a->right[c].v, h2 = b->left[c].v;
		struct pt q[4] = { { a->right[c].u, h1 }, { 0, h1 }, { 0, h2 },
				   { j->dx + b->left[c].u, h2 } };
		if (fabs(h1 - h2) < 1) {
			q[1] = q[3];
			if (!join_line(j, q, 2, c + 1))
				return false;
			continue;
		}
		double u;
		if (h2 > h1)
			u = up = fmax(base_left(j, h1, h2), up + j->du);
		else
			u = down = fmin(base_right(j, h1, h2), down - j->du);
		if (u < base_left(j, h1, h2) || u > base_right(j, h1, h2))
			return no_room(j, "");
		q[1].x = q[2].x = u;
		if (!join_line(j, q, 4, c + 1))
			return false;
	}
	if (up > down - j->du)
		return no_room(j, "");
	return true;
}

/* Across a colon: its own (lowest) band runs into its lower dot and out
 * again; every other band climbs over the upper dot, the top band
 * outermost. */
static bool join_colon(struct joiner *j, int k)
{
	struct gp_digit_unit *a = j->a;
	const struct gp_digit_unit *b = j->b;
	int n = j->row->duty;
	double rc = (double)j->row->colon_size / 2;
	struct gp_box lo = gp_polygon_bounds(&a->parts[k].poly[0]);
	struct gp_box hi = gp_polygon_bounds(&a->parts[k].poly[1]);
	double vlo = ((double)lo.y0 + (double)lo.y1) / 2 - (double)a->origin.y;
	double vhi = ((double)hi.y0 + (double)hi.y1) / 2 - (double)a->origin.y;
	double uc = ((double)lo.x0 + (double)lo.x1) / 2 - (double)a->origin.x -
		    vlo * j->t;
	double clear = a->keep + a->lead / 2;
	double uj = -INFINITY, uk = INFINITY;
	for (int c = 0; c < n; c++) {
		if (!a->right[c].given || !b->left[c].given)
			return no_room(j, " round the colon");
		double h1 = a->right[c].v, h2 = b->left[c].v;
		bool below = c == n - 1 && h1 < vlo - rc - clear;
		if (!below)
			uj = fmax(base_left(j, h1, h2), uj + j->du);
		uk = fmin(base_right(j, h1, h2), uk - j->du);
		if ((!below && uj + clear > uc - rc) || uk - clear < uc + rc)
			return no_room(j, " round the colon");
		double u1 = a->right[c].u, u2 = j->dx + b->left[c].u;
		if (c == n - 1) {
			/* from below, beside the colon's own drop, when
			 * the band comes in under the lower dot */
			struct pt in[4] = { { u1, h1 }, { uj, h1 }, { uj, vlo },
					    { uc, vlo } };
			if (below) {
				in[1] = (struct pt){ uc - rc / 2, h1 };
				in[2] = (struct pt){ uc - rc / 2, vlo };
			}
			struct pt out[4] = { { uc, vlo }, { uk, vlo }, { uk, h2 },
					     { u2, h2 } };
			if (!join_line(j, in, 4, c + 1) ||
			    !join_line(j, out, 4, c + 1))
				return false;
			continue;
		}
		double vo = vhi + rc + clear + (n - 2 - c) * a->pitch;
		vo = fmax(vo, fmax(h1, h2));
		struct pt q[6] = { { u1, h1 }, { uj, h1 }, { uj, vo },
				   { uk, vo }, { uk, h2 }, { u2, h2 } };
		if (!join_line(j, q, 6, c + 1))
			return false;
	}
	return true;
}

static bool join_units(const struct gp_digits *row, struct gp_digit_row *out,
		       struct gp_diag *diag)
{
	struct gp_figure_frame fr;
	gp_figure_frame(&row->figure, &fr);
	for (size_t i = 0; i + 1 < out->unit_count; i++) {
		struct joiner j = { .row = row, .a = &out->units[i],
				    .b = &out->units[i + 1], .t = fr.t,
				    .diag = diag,
				    .du = out->units[i].pitch * fr.sec };
		j.dx = (double)(j.b->origin.x - j.a->origin.x);
		double clear = (j.a->keep + j.a->lead / 2) * fr.sec;
		j.L = j.a->reach_right + clear;
		j.L_hi = j.a->reach_right_hi + clear;
		j.R = j.dx + j.b->reach_left - clear;
		j.R_hi = j.dx + j.b->reach_left_hi - clear;
		int k = part_index(j.a, "colon");
		if (!(k >= 0 ? join_colon(&j, k) : join_plain(&j)))
			return false;
	}
	return true;
}

void gp_digit_row_finish(struct gp_digit_row *row)
{
	for (size_t i = 0; i < row->unit_count; i++) {
		struct gp_digit_unit *u = &row->units[i];
		for (int k = 0; k < u->part_count; k++)
			for (int j = 0; j < u->parts[k].poly_count; j++)
				gp_polygon_finish(&u->parts[k].poly[j]);
		for (int k = 0; k < u->trace_count; k++)
			gp_polygon_finish(&u->traces[k].poly);
		for (int k = 0; k < u->back_count; k++)
			gp_polygon_finish(&u->backs[k].poly);
	}
	free(row->units);
	free(row->ports);
	memset(row, 0, sizeof(*row));
}

bool gp_digits_plan(const struct gp_digits *row,
		    const struct gp_digit_rules *rules, struct gp_digit_row *out,
		    struct gp_diag *diag)
{
	memset(out, 0, sizeof(*out));
	size_t count = (size_t)row->count + (row->minus || row->one ? 1 : 0);
	out->units = calloc(count, sizeof(*out->units));
	if (!out->units)
		return gp_diag_oom(diag, NULL);
	out->unit_count = count;
	size_t k = 0;
	if (row->minus || row->one) {
		if (!sign_unit(row, &out->units[k], diag) ||
		    !plan_unit(row, rules, &out->units[k], out, k, diag))
			goto fail;
		k++;
	}
	for (long i = 0; i < row->count; i++, k++)
		if (!digit_unit(row, i, rules->chord_tolerance, &out->units[k],
				diag) ||
		    !plan_unit(row, rules, &out->units[k], out, k, diag))
			goto fail;
	if (out->units[0].banded && !join_units(row, out, diag))
		goto fail;
	return true;
fail:
	gp_digit_row_finish(out);
	return false;
}
