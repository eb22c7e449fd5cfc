/* Segment digit geometry (see digits.h for the construction). */
#include "digits.h"

#include "geos.h"
#include "units.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define PI 3.14159265358979323846

/* --- construction in double nm, relative to the origin ------------------ */

struct pt {
	double x, y;
};

/* Half-plane nx * x + ny * y >= c, (nx, ny) a unit vector. */
struct hp {
	double nx, ny, c;
	bool gap; /* faces a neighbour across a gap: keep it exact first */
};

#define MAX_HP 16

struct seg {
	struct hp hp[MAX_HP];
	int n;
	struct pt ref; /* a point well inside, to orient cut lines */
	bool used;
};

struct fig {
	const struct gp_figure_spec *spec;
	double t;    /* tan(slant) */
	double sec;  /* 1 / cos(slant): horizontal size of a perpendicular 1 */
	double W, H, S, G;
	double sv;   /* horizontal width of an upright stroke */
	double cu;   /* centre across */
	double il, ir; /* sides of the centre upright */
	double cc;   /* the upright cut through the centre */
	double mlo, mtop, m; /* middle bar, and its centre line */
	double mc;   /* the horizontal cut between upper and lower halves */
	struct seg seg[GP_FIGURE_MAX_SEGMENTS];
	bool overflow;
};

/* Upright construction point (u, v) after shearing. */
static struct pt at(const struct fig *f, double u, double v)
{
	return (struct pt){ u + v * f->t, v };
}

static int idx(const struct fig *f, const char *name)
{
	return gp_figure_segment_index(f->spec->figure, name);
}

static void add_hp(struct fig *f, int s, struct hp h)
{
	if (s < 0)
		return;
	if (f->seg[s].n == MAX_HP) {
		f->overflow = true;
		return;
	}
	f->seg[s].hp[f->seg[s].n++] = h;
}

/* Half-plane bounded by the line through p and q, on the side of inside,
 * its boundary moved `off` towards inside (perpendicular). */
static struct hp hp_line(struct pt p, struct pt q, struct pt inside, double off)
{
	double dx = q.x - p.x, dy = q.y - p.y, len = hypot(dx, dy);
	struct hp h = { -dy / len, dx / len, 0, true };
	if (h.nx * (inside.x - p.x) + h.ny * (inside.y - p.y) < 0) {
		h.nx = -h.nx;
		h.ny = -h.ny;
	}
	h.c = h.nx * p.x + h.ny * p.y + off;
	return h;
}

static void bound(struct fig *f, int s, struct pt p, struct pt q, double off)
{
	if (s >= 0)
		add_hp(f, s, hp_line(p, q, f->seg[s].ref, off));
}

/* A cut shared by segments a and b along the line p q: a keeps off_a away
 * from it, b keeps off_b (their sum is the gap). */
static void cut(struct fig *f, int a, int b, struct pt p, struct pt q,
		double off_a, double off_b)
{
	bound(f, a, p, q, off_a);
	bound(f, b, p, q, off_b);
}

/* Horizontal line at height v. */
static void cut_h(struct fig *f, int a, int b, double v, double off_a,
		  double off_b)
{
	cut(f, a, b, (struct pt){ 0, v }, (struct pt){ 1, v }, off_a, off_b);
}

/* Upright line at u (slanted after shearing). */
static void cut_u(struct fig *f, int a, int b, double u, double off_a,
		  double off_b)
{
	cut(f, a, b, at(f, u, 0), at(f, u, f->H), off_a, off_b);
}

static void start(struct fig *f, const char *name, double u, double v)
{
	int s = idx(f, name);
	if (s < 0)
		return;
	f->seg[s].used = true;
	f->seg[s].ref = at(f, u, v);
	/* the outline */
	bound(f, s, at(f, 0, 0), at(f, 0, f->H), 0);
	bound(f, s, at(f, f->W, 0), at(f, f->W, f->H), 0);
	bound(f, s, (struct pt){ 0, 0 }, (struct pt){ 1, 0 }, 0);
	bound(f, s, (struct pt){ 0, f->H }, (struct pt){ 1, f->H }, 0);
	/* the upright sides of the outline face no neighbour inside the
	 * figure; horizontal lines stay exact whatever they face */
	f->seg[s].hp[0].gap = false;
	f->seg[s].hp[1].gap = false;
}

static void hstrip(struct fig *f, const char *name, double u, double v0,
		   double v1)
{
	start(f, name, u, (v0 + v1) / 2);
	int s = idx(f, name);
	bound(f, s, (struct pt){ 0, v0 }, (struct pt){ 1, v0 }, 0);
	bound(f, s, (struct pt){ 0, v1 }, (struct pt){ 1, v1 }, 0);
}

static void vstrip(struct fig *f, const char *name, double u0, double u1,
		   double v)
{
	start(f, name, (u0 + u1) / 2, v);
	int s = idx(f, name);
	bound(f, s, at(f, u0, 0), at(f, u0, f->H), 0);
	bound(f, s, at(f, u1, 0), at(f, u1, f->H), 0);
}

/* A diagonal stroke along p q (upright points), stroke wide. */
static void dstrip(struct fig *f, const char *name, double pu, double pv,
		   double qu, double qv)
{
	struct pt p = at(f, pu, pv), q = at(f, qu, qv);
	start(f, name, (pu + qu) / 2, (pv + qv) / 2);
	int s = idx(f, name);
	if (s < 0)
		return;
	double dx = q.x - p.x, dy = q.y - p.y, len = hypot(dx, dy);
	struct pt n = { -dy / len, dx / len };
	double h = f->S / 2;
	struct pt p1 = { p.x + n.x * h, p.y + n.y * h };
	struct pt q1 = { q.x + n.x * h, q.y + n.y * h };
	struct pt p2 = { p.x - n.x * h, p.y - n.y * h };
	struct pt q2 = { q.x - n.x * h, q.y - n.y * h };
	bound(f, s, p1, q1, 0);
	bound(f, s, p2, q2, 0);
	f->seg[s].hp[f->seg[s].n - 1].gap = false;
	f->seg[s].hp[f->seg[s].n - 2].gap = false;
}

static void setup(struct fig *f, const struct gp_figure_spec *spec)
{
	memset(f, 0, sizeof(*f));
	f->spec = spec;
	f->t = tan(spec->slant * PI / 180.0);
	f->sec = sqrt(1 + f->t * f->t);
	f->W = (double)spec->width;
	f->H = (double)spec->height;
	f->S = (double)spec->stroke;
	f->G = (double)spec->gap;
	f->sv = f->S * f->sec;
	f->cu = f->W / 2;
	/* Without slant these land on whole nanometres, so that rounding
	 * cannot move the two sides of a gap apart differently. */
	f->il = floor(f->cu - f->sv / 2 + 0.5);
	f->ir = f->il + f->sv;
	f->cc = floor(f->cu + f->G / 2 + 0.5) - f->G / 2;
	/* Horizontal edges on whole nanometres keep heights exact. */
	f->mlo = floor((f->H - f->S) / 2);
	f->mtop = f->mlo + f->S;
	f->m = (f->mlo + f->mtop) / 2;
	f->mc = floor(f->m + f->G / 2 + 0.5) - f->G / 2;
}

/* The segments' strokes. */
static void strokes(struct fig *f)
{
	double W = f->W, H = f->H, S = f->S, sv = f->sv;
	double il = f->il, ir = f->ir;
	double upper = (f->mtop + H - S) / 2, lower = (S + f->mlo) / 2;
	hstrip(f, "a", W / 2, H - S, H);
	hstrip(f, "a1", f->cc / 2, H - S, H);
	hstrip(f, "a2", (f->cc + W) / 2, H - S, H);
	hstrip(f, "d", W / 2, 0, S);
	hstrip(f, "d1", f->cc / 2, 0, S);
	hstrip(f, "d2", (f->cc + W) / 2, 0, S);
	hstrip(f, "g", W / 2, f->mlo, f->mtop);
	hstrip(f, "g1", (sv + f->cc) / 2, f->mlo, f->mtop);
	hstrip(f, "g2", (f->cc + W - sv) / 2, f->mlo, f->mtop);
	vstrip(f, "b", W - sv, W, upper);
	vstrip(f, "c", W - sv, W, lower);
	vstrip(f, "e", 0, sv, lower);
	vstrip(f, "f", 0, sv, upper);
	vstrip(f, "i", il, ir, upper);
	vstrip(f, "l", il, ir, lower);
	dstrip(f, "h", sv, H - S, il, f->mtop);
	dstrip(f, "j", W - sv, H - S, ir, f->mtop);
	dstrip(f, "k", sv, S, il, f->mlo);
	dstrip(f, "m", W - sv, S, ir, f->mlo);
}

static int first_of(const struct fig *f, const char *a, const char *b)
{
	int i = idx(f, a);
	return i >= 0 ? i : idx(f, b);
}

/* The outer ring: corners and the two middle joints. */
static void ring_cuts(struct fig *f)
{
	double W = f->W, H = f->H, S = f->S, G = f->G, sv = f->sv;
	int tl = first_of(f, "a", "a1"), tr = first_of(f, "a", "a2");
	int bl = first_of(f, "d", "d1"), br = first_of(f, "d", "d2");
	int gl = first_of(f, "g", "g1"), gr = first_of(f, "g", "g2");
	int b = idx(f, "b"), c = idx(f, "c"), e = idx(f, "e"), fi = idx(f, "f");
	cut_h(f, fi, e, f->mc, G / 2, G / 2);
	cut_h(f, b, c, f->mc, G / 2, G / 2);
	if (f->spec->ends == GP_ENDS_SQUARE) {
		cut_h(f, tl, fi, H - S - G / 2, G / 2, G / 2);
		cut_h(f, tr, b, H - S - G / 2, G / 2, G / 2);
		cut_h(f, bl, e, S + G / 2, G / 2, G / 2);
		cut_h(f, br, c, S + G / 2, G / 2, G / 2);
		cut_u(f, gl, fi, sv, G, 0);
		cut_u(f, gl, e, sv, G, 0);
		cut_u(f, gr, b, W - sv, G, 0);
		cut_u(f, gr, c, W - sv, G, 0);
		return;
	}
	cut(f, tl, fi, at(f, 0, H), at(f, sv, H - S), G / 2, G / 2);
	cut(f, tr, b, at(f, W, H), at(f, W - sv, H - S), G / 2, G / 2);
	cut(f, bl, e, at(f, 0, 0), at(f, sv, S), G / 2, G / 2);
	cut(f, br, c, at(f, W, 0), at(f, W - sv, S), G / 2, G / 2);
	struct pt ml = at(f, sv / 2, f->m), mr = at(f, W - sv / 2, f->m);
	cut(f, fi, gl, ml, at(f, sv, f->mtop), G / 2, G / 2);
	cut(f, e, gl, ml, at(f, sv, f->mlo), G / 2, G / 2);
	cut(f, b, gr, mr, at(f, W - sv, f->mtop), G / 2, G / 2);
	cut(f, c, gr, mr, at(f, W - sv, f->mlo), G / 2, G / 2);
}

/* Segments inside the ring of 14- and 16-segment figures: each keeps the
 * gap from the strokes around its counter. */
static void inner_cuts(struct fig *f)
{
	double W = f->W, H = f->H, S = f->S, G = f->G, sv = f->sv;
	int i = idx(f, "i"), l = idx(f, "l");
	int h = idx(f, "h"), j = idx(f, "j"), k = idx(f, "k"), m = idx(f, "m");
	if (i < 0)
		return;
	cut_u(f, idx(f, "g1"), idx(f, "g2"), f->cc, G / 2, G / 2);
	cut_u(f, idx(f, "a1"), idx(f, "a2"), f->cc, G / 2, G / 2);
	cut_u(f, idx(f, "d1"), idx(f, "d2"), f->cc, G / 2, G / 2);
	cut_h(f, i, -1, H - S, G, 0);
	cut_h(f, i, -1, f->mtop, G, 0);
	cut_h(f, l, -1, f->mlo, G, 0);
	cut_h(f, l, -1, S, G, 0);
	int upper[2] = { h, j }, lower[2] = { k, m };
	for (int side = 0; side < 2; side++) {
		double outer = side ? W - sv : sv;
		double inner = side ? f->ir : f->il;
		cut_u(f, upper[side], lower[side], outer, G, G);
		cut_u(f, upper[side], lower[side], inner, G, G);
		cut_h(f, upper[side], -1, H - S, G, 0);
		cut_h(f, upper[side], -1, f->mtop, G, 0);
		cut_h(f, lower[side], -1, f->mlo, G, 0);
		cut_h(f, lower[side], -1, S, G, 0);
	}
}

/* --- clipping and rounding -------------------------------------------------- */

struct vtx {
	struct pt p;
	int line; /* half-plane whose boundary runs from this vertex on */
};

#define MAX_VTX (4 + 2 * MAX_HP)

static double side_of(struct hp h, struct pt p)
{
	return h.nx * p.x + h.ny * p.y - h.c;
}

static int clip(struct vtx *v, int n, struct hp h, int id, struct vtx *out)
{
	int k = 0;
	for (int i = 0; i < n; i++) {
		struct vtx a = v[i], b = v[(i + 1) % n];
		double da = side_of(h, a.p), db = side_of(h, b.p);
		if (da >= 0)
			out[k++] = a;
		if ((da >= 0) != (db >= 0)) {
			double s = da / (da - db);
			struct pt x = { a.p.x + s * (b.p.x - a.p.x),
					a.p.y + s * (b.p.y - a.p.y) };
			out[k++] = (struct vtx){ x, da >= 0 ? id : a.line };
		}
	}
	return k;
}

static bool meet(struct hp a, struct hp b, struct pt *p)
{
	double det = a.nx * b.ny - a.ny * b.nx;
	if (fabs(det) < 1e-12)
		return false;
	p->x = (a.c * b.ny - b.c * a.ny) / det;
	p->y = (a.nx * b.c - b.nx * a.c) / det;
	return true;
}

/* The lattice point next to p that keeps the lines through it closest:
 * a gap changes by at most the distance of its edges' end points from
 * their lines, so lines facing a gap are served first, then the others,
 * then nearness to p. */
static struct gp_point snap(struct pt p, const struct hp *a,
			    const struct hp *b)
{
	double fx = floor(p.x), fy = floor(p.y);
	struct gp_point best = { (int64_t)llround(p.x), (int64_t)llround(p.y) };
	double best_cost[3] = { INFINITY, INFINITY, INFINITY };
	for (int k = 0; k < 4; k++) {
		struct pt q = { fx + (k & 1), fy + (k >> 1) };
		double cost[3] = { 0, 0, hypot(q.x - p.x, q.y - p.y) };
		const struct hp *lines[2] = { a, b };
		for (int i = 0; i < 2; i++)
			if (lines[i])
				cost[lines[i]->gap ? 0 : 1] = fmax(
					cost[lines[i]->gap ? 0 : 1],
					fabs(side_of(*lines[i], q)));
		int better = 0;
		for (int i = 0; i < 3 && !better; i++)
			if (cost[i] < best_cost[i] - 1e-9)
				better = 1;
			else if (cost[i] > best_cost[i] + 1e-9)
				better = -1;
		if (better > 0) {
			memcpy(best_cost, cost, sizeof(cost));
			best = (struct gp_point){ (int64_t)q.x, (int64_t)q.y };
		}
	}
	return best;
}

/* A vertex on a line that the polygon only touches comes out twice, with
 * different lines; rounded apart, the copies would leave a 1 nm step.  Keep
 * the copy whose outgoing edge has length. */
static int drop_repeats(struct vtx *v, int n)
{
	int k = 0;
	for (int i = 0; i < n; i++) {
		struct pt p = v[i].p, q = v[(i + 1) % n].p;
		if (n - (i - k) > 3 && fabs(p.x - q.x) < 1e-6 &&
		    fabs(p.y - q.y) < 1e-6)
			continue;
		v[k++] = v[i];
	}
	return k;
}

static bool polygon_of(const struct fig *f, int s, struct gp_point origin,
		       struct gp_polygon *out)
{
	const struct seg *g = &f->seg[s];
	double big = 4 * (f->W + f->H);
	struct vtx a[MAX_VTX], b[MAX_VTX];
	int n = 4;
	a[0] = (struct vtx){ { -big, -big }, -1 };
	a[1] = (struct vtx){ { big, -big }, -1 };
	a[2] = (struct vtx){ { big, big }, -1 };
	a[3] = (struct vtx){ { -big, big }, -1 };
	for (int i = 0; i < g->n && n > 0; i++) {
		n = clip(a, n, g->hp[i], i, b);
		memcpy(a, b, (size_t)n * sizeof(*a));
	}
	n = drop_repeats(a, n);
	gp_polygon_init(out);
	for (int i = 0; i < n; i++) {
		int l0 = a[(i + n - 1) % n].line, l1 = a[i].line;
		struct pt p = a[i].p;
		if (l0 >= 0 && l1 >= 0)
			meet(g->hp[l0], g->hp[l1], &p);
		struct gp_point q = snap(p, l0 >= 0 ? &g->hp[l0] : NULL,
					 l1 >= 0 ? &g->hp[l1] : NULL);
		if (!gp_ring_push(&out->outer, origin.x + q.x, origin.y + q.y))
			return false;
	}
	gp_ring_clean(&out->outer);
	gp_polygon_normalize(out);
	return true;
}

/* --- public ----------------------------------------------------------------- */

void gp_figure_frame(const struct gp_figure_spec *spec,
		     struct gp_figure_frame *out)
{
	struct fig f;
	setup(&f, spec);
	*out = (struct gp_figure_frame){
		.t = f.t, .sec = f.sec, .W = f.W, .H = f.H, .S = f.S, .G = f.G,
		.sv = f.sv, .il = f.il, .ir = f.ir, .cc = f.cc, .mlo = f.mlo,
		.mtop = f.mtop, .m = f.m, .mc = f.mc,
	};
}

int64_t gp_figure_shear(const struct gp_figure_spec *spec, int64_t y)
{
	return (int64_t)llround((double)y * tan(spec->slant * PI / 180.0));
}

static void finish_segments(struct gp_polygon *out, size_t count)
{
	for (size_t s = 0; s < count; s++)
		gp_polygon_finish(&out[s]);
}

bool gp_figure_build(const struct gp_figure_spec *spec, struct gp_point origin,
		     const char *what, const struct gp_where *where,
		     struct gp_polygon *out, struct gp_diag *diag)
{
	struct fig f;
	setup(&f, spec);
	strokes(&f);
	ring_cuts(&f);
	inner_cuts(&f);
	size_t count = gp_figure_segment_count(spec->figure);
	for (size_t s = 0; s < count; s++)
		gp_polygon_init(&out[s]);
	if (f.overflow)
		return gp_diag_error(diag, where, "%s: internal limit of "
				     "cut lines per segment exceeded", what);
	double least = f.S * f.S / 2 / 1e12; /* mm^2 */
	for (size_t s = 0; s < count; s++) {
		if (!polygon_of(&f, (int)s, origin, &out[s])) {
			finish_segments(out, count);
			return gp_diag_oom(diag, where);
		}
		if (out[s].outer.count < 3 ||
		    gp_polygon_area_mm2(&out[s]) < least) {
			finish_segments(out, count);
			return gp_diag_error(diag, where,
					     "%s: segment '%s' has no room "
					     "at this stroke and gap; widen or "
					     "heighten the digit", what,
					     gp_figure_segment_name(
						     spec->figure, s));
		}
	}
	return true;
}

bool gp_dot_build(enum gp_dot_shape shape, int64_t size, double slant,
		  struct gp_point c, int64_t chord_tolerance,
		  struct gp_polygon *out)
{
	gp_polygon_init(out);
	double r = (double)size / 2;
	if (shape == GP_DOT_ROUND) {
		int n = 4 * gp_geos_quadrant_segments(size / 2,
						      chord_tolerance);
		for (int k = 0; k < n; k++) {
			double a = 2 * PI * k / n;
			if (!gp_ring_push(&out->outer,
					  c.x + llround(r * cos(a)),
					  c.y + llround(r * sin(a))))
				return false;
		}
	} else {
		/* whole-nm heights, so only x is rounded on the sides */
		double t = tan(slant * PI / 180.0), hw = r * sqrt(1 + t * t);
		int64_t y[2] = { c.y - size / 2, c.y - size / 2 + size };
		static const int su[4] = { -1, 1, 1, -1 }, sv[4] = { 0, 0, 1, 1 };
		for (int k = 0; k < 4; k++) {
			double v = (double)(y[sv[k]] - c.y);
			if (!gp_ring_push(&out->outer,
					  c.x + llround(su[k] * hw + v * t),
					  y[sv[k]]))
				return false;
		}
	}
	gp_ring_clean(&out->outer);
	gp_polygon_normalize(out);
	return true;
}

struct gp_point gp_point_default_centre(const struct gp_figure_spec *spec,
					struct gp_point origin,
					enum gp_dot_shape shape, int64_t size,
					int64_t gap)
{
	(void)shape;
	double t = tan(spec->slant * PI / 180.0), sec = sqrt(1 + t * t);
	double yc = (double)(size / 2);
	double xc = (double)spec->width + yc * t +
		    ((double)size / 2 + (double)gap) * sec;
	return (struct gp_point){ origin.x + llround(xc),
				  origin.y + (int64_t)yc };
}
