/* Icon geometry: shapes, width and space checks, bridges.  See icons.h. */
#include "icons.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define PI 3.14159265358979323846

/* --- shapes ---------------------------------------------------------------- */

/* Local shape frame: centred on the icon's position, before mirror and
 * rotation. */
static struct gp_point place(const struct gp_icon *icon, double x, double y)
{
	int64_t px = llround(x), py = llround(y);
	if (icon->mirror)
		px = -px;
	int64_t rx = px, ry = py;
	switch (icon->rotation) {
	case 90: rx = -py, ry = px; break;
	case 180: rx = -px, ry = -py; break;
	case 270: rx = py, ry = -px; break;
	default: break;
	}
	if (icon->turn != 0) {
		/* a cell of an array along an arc turns with it */
		double a = icon->turn * PI / 180, x0 = (double)rx, y0 = (double)ry;
		rx = llround(x0 * cos(a) - y0 * sin(a));
		ry = llround(x0 * sin(a) + y0 * cos(a));
	}
	return (struct gp_point){ icon->position.x + rx,
				  icon->position.y + ry };
}

static bool push(struct gp_ring *ring, const struct gp_icon *icon, double x,
		 double y)
{
	struct gp_point p = place(icon, x, y);
	return gp_ring_push(ring, p.x, p.y);
}

/* Quarter arcs of radius r about (cx, cy) from angle a0 (in quarter turns)
 * for `quarters` quarter turns, vertices on the arc. */
static bool arc(struct gp_ring *ring, const struct gp_icon *icon, double cx,
		double cy, double r, int a0, int quarters, int per_quarter)
{
	int n = quarters * per_quarter;
	for (int i = 0; i <= n; i++) {
		double t = (a0 + (double)i / per_quarter) * (PI / 2);
		if (!push(ring, icon, cx + r * cos(t), cy + r * sin(t)))
			return false;
	}
	return true;
}

static bool circle(struct gp_ring *ring, const struct gp_icon *icon,
		   double r, int64_t tolerance)
{
	int q = gp_geos_quadrant_segments((int64_t)r, tolerance);
	if (!arc(ring, icon, 0, 0, r, 0, 4, q))
		return false;
	ring->count--; /* the last point repeats the first */
	return true;
}

static bool rounded(struct gp_ring *ring, const struct gp_icon *icon,
		    int64_t tolerance)
{
	double w = (double)icon->size[0] / 2, h = (double)icon->size[1] / 2;
	double r = (double)icon->radius;
	int q = gp_geos_quadrant_segments(icon->radius, tolerance);
	return arc(ring, icon, w - r, -h + r, r, 3, 1, q) &&
	       arc(ring, icon, w - r, h - r, r, 0, 1, q) &&
	       arc(ring, icon, -w + r, h - r, r, 1, 1, q) &&
	       arc(ring, icon, -w + r, -h + r, r, 2, 1, q);
}

static bool corners(struct gp_ring *ring, const struct gp_icon *icon,
		    const double (*xy)[2], size_t count)
{
	for (size_t i = 0; i < count; i++)
		if (!push(ring, icon, xy[i][0], xy[i][1]))
			return false;
	return true;
}

static bool arrow(struct gp_ring *ring, const struct gp_icon *icon)
{
	double l = (double)icon->size[0] / 2, w = (double)icon->size[1] / 2;
	double s = (double)icon->line / 2, neck = l - (double)icon->head;
	const double xy[][2] = {
		{ -l, -s }, { neck, -s }, { neck, -w }, { l, 0 },
		{ neck, w }, { neck, s }, { -l, s },
	};
	return corners(ring, icon, xy, 7);
}

/* Rings of a shape (the second one of a ring is its hole, wound the other
 * way, so that the non-zero rule leaves it empty). */
static bool shape_rings(const struct gp_icon *icon, int64_t tolerance,
			struct gp_ring rings[2], size_t *count)
{
	double w = (double)icon->size[0] / 2, h = (double)icon->size[1] / 2;
	*count = 1;
	switch (icon->kind) {
	case GP_ICON_RECTANGLE: {
		const double xy[][2] = { { -w, -h }, { w, -h }, { w, h },
					 { -w, h } };
		return corners(&rings[0], icon, xy, 4);
	}
	case GP_ICON_ROUNDED_RECTANGLE:
		return rounded(&rings[0], icon, tolerance);
	case GP_ICON_CIRCLE:
		return circle(&rings[0], icon, (double)icon->diameter / 2,
			      tolerance);
	case GP_ICON_RING:
		*count = 2;
		if (!circle(&rings[0], icon, (double)icon->diameter / 2,
			    tolerance) ||
		    !circle(&rings[1], icon,
			    (double)icon->diameter / 2 - (double)icon->line,
			    tolerance))
			return false;
		gp_ring_reverse(&rings[1]);
		return true;
	case GP_ICON_TRIANGLE: {
		/* points up (+y) before rotation */
		const double xy[][2] = { { -w, -h }, { w, -h }, { 0, h } };
		return corners(&rings[0], icon, xy, 3);
	}
	case GP_ICON_ARROW:
		return arrow(&rings[0], icon);
	case GP_ICON_POLYGON:
		for (size_t i = 0; i < icon->point_count; i++)
			if (!push(&rings[0], icon, (double)icon->points[i].x,
				  (double)icon->points[i].y))
				return false;
		return true;
	case GP_ICON_TEXT:
		break;
	}
	return false;
}

bool gp_icon_shape(struct gp_geos *geos, const struct gp_icon *icon,
		   int64_t tolerance, struct gp_polyset *out)
{
	struct gp_ring rings[2];
	size_t count = 0;
	gp_ring_init(&rings[0]);
	gp_ring_init(&rings[1]);
	bool ok = shape_rings(icon, tolerance, rings, &count) &&
		  gp_geos_make_valid(geos, rings, count, GP_FILL_NONZERO, out);
	gp_ring_finish(&rings[0]);
	gp_ring_finish(&rings[1]);
	return ok;
}

/* --- width and space ----------------------------------------------------- */

/* Keeps the pieces of set with more area than limit_mm2, appended to out. */
static void keep_large(struct gp_polyset *set, double limit_mm2,
		       struct gp_polyset *out, bool *ok)
{
	for (size_t i = 0; i < set->count; i++) {
		if (gp_polygon_area_mm2(&set->items[i]) <= limit_mm2)
			continue;
		if (!gp_polyset_take(out, &set->items[i]))
			*ok = false;
	}
}

static double square_mm2(int64_t length)
{
	double mm = (double)length / 1e6;
	return mm * mm;
}

bool gp_thin_parts(struct gp_geos *geos, const struct gp_polyset *set,
		   int64_t width, struct gp_polyset *out)
{
	struct gp_polyset eroded, opened, lost;
	gp_polyset_init(&eroded);
	gp_polyset_init(&opened);
	gp_polyset_init(&lost);
	int64_t half = (width + 1) / 2;
	bool ok = gp_geos_offset(geos, set, -half, GP_JOIN_MITRE, 0,
				 &eroded) &&
		  gp_geos_offset(geos, &eroded, half, GP_JOIN_MITRE, 0,
				 &opened) &&
		  gp_geos_difference(geos, set, &opened, &lost);
	if (ok)
		keep_large(&lost, square_mm2(width) / 2, out, &ok);
	gp_polyset_finish(&eroded);
	gp_polyset_finish(&opened);
	gp_polyset_finish(&lost);
	return ok;
}

bool gp_narrow_gaps(struct gp_geos *geos, const struct gp_polygon *poly,
		    int64_t space, struct gp_polyset *out)
{
	struct gp_polyset one, grown, closed, filled;
	gp_polyset_init(&one);
	gp_polyset_init(&grown);
	gp_polyset_init(&closed);
	gp_polyset_init(&filled);
	int64_t half = (space + 1) / 2;
	struct gp_polygon copy;
	bool ok = gp_polygon_copy(&copy, poly) && gp_polyset_take(&one, &copy);
	ok = ok &&
	     gp_geos_offset(geos, &one, half, GP_JOIN_MITRE, 0, &grown) &&
	     gp_geos_offset(geos, &grown, -half, GP_JOIN_MITRE, 0, &closed) &&
	     gp_geos_difference(geos, &closed, &one, &filled);
	if (ok)
		keep_large(&filled, square_mm2(space) / 2, out, &ok);
	gp_polyset_finish(&one);
	gp_polyset_finish(&grown);
	gp_polyset_finish(&closed);
	gp_polyset_finish(&filled);
	return ok;
}

/* --- bridges ------------------------------------------------------------- */

/* The rectangle of the given width around the segment p0-p1. */
static bool strip(double x0, double y0, double x1, double y1, double width,
		  struct gp_polygon *out)
{
	double dx = x1 - x0, dy = y1 - y0, len = hypot(dx, dy);
	double nx = -dy / len * width / 2, ny = dx / len * width / 2;
	gp_polygon_init(out);
	if (!gp_ring_push(&out->outer, llround(x0 + nx), llround(y0 + ny)) ||
	    !gp_ring_push(&out->outer, llround(x0 - nx), llround(y0 - ny)) ||
	    !gp_ring_push(&out->outer, llround(x1 - nx), llround(y1 - ny)) ||
	    !gp_ring_push(&out->outer, llround(x1 + nx), llround(y1 + ny))) {
		gp_polygon_finish(out);
		return false;
	}
	gp_polygon_normalize(out);
	return true;
}

/* --- bridges: where a line runs from one part to the other -------------- */

struct line {
	double ox, oy, ux, uy;    /* origin and unit direction, nm */
};

struct span {
	double t0, t1;            /* along the line */
	int part;                 /* 0: a, 1: b */
};

static int compare_double(const void *x, const void *y)
{
	double a = *(const double *)x, b = *(const double *)y;
	return a < b ? -1 : a > b;
}

static bool inside_polygon(const struct gp_polygon *poly, double x, double y)
{
	bool in = false;
	for (size_t r = 0; r <= poly->hole_count; r++) {
		const struct gp_ring *ring = r ? &poly->holes[r - 1] : &poly->outer;
		for (size_t i = 0, j = ring->count - 1; i < ring->count; j = i++) {
			double xi = (double)ring->points[i].x;
			double yi = (double)ring->points[i].y;
			double xj = (double)ring->points[j].x;
			double yj = (double)ring->points[j].y;
			if ((yi > y) != (yj > y) &&
			    x < (xj - xi) * (y - yi) / (yj - yi) + xi)
				in = !in;
		}
	}
	return in;
}

/* Adds the parameters where the line crosses the ring's edges. */
static void ring_crossings(const struct gp_ring *ring, const struct line *l,
			   double *t, size_t *n)
{
	for (size_t i = 0; i < ring->count; i++) {
		const struct gp_point *p = &ring->points[i];
		const struct gp_point *q = &ring->points[(i + 1) % ring->count];
		double ex = (double)(q->x - p->x), ey = (double)(q->y - p->y);
		double den = l->ux * ey - l->uy * ex;
		if (den == 0)
			continue;
		double wx = (double)p->x - l->ox, wy = (double)p->y - l->oy;
		double s = (l->uy * wx - l->ux * wy) / den; /* along the edge */
		if (s < 0 || s > 1)
			continue;
		t[(*n)++] = (wx * ey - wy * ex) / den;
	}
}

/* Spans of the line inside poly, appended to spans. */
static bool line_spans(const struct gp_polygon *poly, const struct line *l,
		       int part, struct span **spans, size_t *count)
{
	size_t edges = poly->outer.count;
	for (size_t r = 0; r < poly->hole_count; r++)
		edges += poly->holes[r].count;
	double *t = malloc((edges + 1) * sizeof(*t));
	if (!t)
		return false;
	size_t n = 0;
	ring_crossings(&poly->outer, l, t, &n);
	for (size_t r = 0; r < poly->hole_count; r++)
		ring_crossings(&poly->holes[r], l, t, &n);
	qsort(t, n, sizeof(*t), compare_double);
	bool ok = true;
	for (size_t i = 0; ok && i + 1 < n; i++) {
		double m = (t[i] + t[i + 1]) / 2;
		if (t[i + 1] - t[i] < 1 ||
		    !inside_polygon(poly, l->ox + l->ux * m, l->oy + l->uy * m))
			continue;
		struct span *grown = realloc(*spans, (*count + 1) *
							     sizeof(*grown));
		if (!grown) {
			ok = false;
			break;
		}
		*spans = grown;
		(*spans)[(*count)++] = (struct span){ t[i], t[i + 1], part };
	}
	free(t);
	return ok;
}

static int compare_span(const void *x, const void *y)
{
	const struct span *a = x, *b = y;
	return a->t0 < b->t0 ? -1 : a->t0 > b->t0;
}

/* The shortest run of the line from one part straight to the other:
 * *t0..*t1 with width reached into each part (no deeper than the part
 * is along the line).  False when the line does not go from one to the
 * other. */
static bool shortest_gap(struct span *spans, size_t count, double width,
			 double *t0, double *t1, double *gap_out)
{
	if (count > 1) /* spans may be NULL when empty */
		qsort(spans, count, sizeof(*spans), compare_span);
	double best = INFINITY;
	for (size_t i = 0; i + 1 < count; i++) {
		const struct span *p = &spans[i], *q = &spans[i + 1];
		double gap = q->t0 - p->t1;
		if (p->part == q->part || gap <= 0 || gap >= best)
			continue;
		best = *gap_out = gap;
		double dp = p->t1 - p->t0, dq = q->t1 - q->t0;
		*t0 = p->t1 - (dp < width ? dp : width);
		*t1 = q->t0 + (dq < width ? dq : width);
	}
	return best < INFINITY;
}

struct candidate {
	struct gp_geos *geos;
	const struct gp_polygon *a, *b;
	struct gp_geos_shape *both;
	struct gp_point pa, pb;
	int64_t width;
};

/* The bridge along the line offset sideways by `side` from the one
 * through the nearest points, or an empty polygon when there is none. */
static bool candidate_at(struct candidate *c, double side,
			 struct gp_polygon *out, double *gap)
{
	double dx = (double)(c->pb.x - c->pa.x), dy = (double)(c->pb.y - c->pa.y);
	double len = hypot(dx, dy);
	struct line l = { .ux = dx / len, .uy = dy / len };
	l.ox = (double)c->pa.x - l.uy * side;
	l.oy = (double)c->pa.y + l.ux * side;
	struct span *spans = NULL;
	size_t count = 0;
	double t0 = 0, t1 = 0;
	gp_polygon_init(out);
	bool ok = line_spans(c->a, &l, 0, &spans, &count) &&
		  line_spans(c->b, &l, 1, &spans, &count);
	if (ok && shortest_gap(spans, count, (double)c->width, &t0, &t1, gap))
		ok = strip(l.ox + l.ux * t0, l.oy + l.uy * t0,
			   l.ox + l.ux * t1, l.oy + l.uy * t1,
			   (double)c->width + 2, out);
	free(spans);
	return ok;
}

static bool clear_of(struct gp_geos *geos, const struct gp_geos_shape *piece,
		     const struct gp_keepout *keep, size_t keep_count,
		     bool *clear)
{
	*clear = true;
	for (size_t i = 0; i < keep_count && *clear; i++) {
		double d;
		if (!gp_geos_shape_distance(geos, keep[i].shape, piece, &d))
			return false;
		*clear = d >= (double)keep[i].distance;
	}
	return true;
}

/* Whether the part of the bridge outside both parts is no more than the
 * run across the gap (a bridge grazing along an edge is not) and keeps
 * clear of the keep-outs. */
static bool bridge_clear(struct candidate *c, const struct gp_polygon *bridge,
			 double gap, const struct gp_keepout *keep,
			 size_t keep_count, bool *clear)
{
	struct gp_geos_shape *s = gp_geos_shape_from_polygon(c->geos, bridge);
	struct gp_geos_shape *outside =
		s ? gp_geos_shape_difference(c->geos, s, c->both) : NULL;
	double w = (double)c->width + 2;
	double allowed = w * (gap + w / 4) / 1e12; /* mm^2 */
	bool ok = outside != NULL;
	*clear = ok && gp_geos_shape_area_mm2(c->geos, outside) <= allowed;
	if (ok && *clear)
		ok = clear_of(c->geos, outside, keep, keep_count, clear);
	gp_geos_shape_destroy(c->geos, s);
	gp_geos_shape_destroy(c->geos, outside);
	return ok;
}

static double extent(const struct gp_polygon *p)
{
	struct gp_box b = gp_polygon_bounds(p);
	double w = (double)gp_box_width(b), h = (double)gp_box_height(b);
	return w > h ? w : h;
}

bool gp_bridge_find(struct gp_geos *geos, const struct gp_polygon *a,
		    const struct gp_polygon *b, int64_t width,
		    const struct gp_keepout *keep, size_t keep_count,
		    struct gp_polyset *out, bool *found)
{
	*found = false;
	struct candidate c = { .geos = geos, .a = a, .b = b, .width = width };
	struct gp_geos_shape *sa = gp_geos_shape_from_polygon(geos, a);
	struct gp_geos_shape *sb = gp_geos_shape_from_polygon(geos, b);
	struct gp_geos_shape *parts[2] = { sa, sb };
	bool ok = sa && sb &&
		  gp_geos_shape_nearest(geos, sa, sb, &c.pa, &c.pb) &&
		  (c.both = gp_geos_shape_union(geos, parts, 2)) != NULL;
	if (ok && c.pa.x == c.pb.x && c.pa.y == c.pb.y)
		*found = true; /* they touch */
	double ea = extent(a), eb = extent(b);
	int steps = (int)((ea > eb ? ea : eb) / (double)width) + 1;
	/* sideways steps of one width: 0, +1, -1, +2, -2, ... */
	for (int k = 0; ok && !*found && k <= 2 * steps; k++) {
		double side = (double)((k + 1) / 2) * (double)width *
			      (k % 2 ? 1 : -1);
		struct gp_polygon bridge;
		bool clear = false;
		double gap = 0;
		ok = candidate_at(&c, side, &bridge, &gap);
		if (ok && bridge.outer.count)
			ok = bridge_clear(&c, &bridge, gap, keep, keep_count,
					  &clear);
		if (ok && clear) {
			ok = gp_polyset_take(out, &bridge);
			*found = ok;
		}
		gp_polygon_finish(&bridge);
	}
	gp_geos_shape_destroy(geos, c.both);
	gp_geos_shape_destroy(geos, sa);
	gp_geos_shape_destroy(geos, sb);
	return ok;
}

/* Prim's tree over the parts by distance: edge (parent[i], i) for every
 * part but the first. */
static bool spanning_tree(struct gp_geos *geos, struct gp_geos_shape **parts,
			  size_t n, size_t *parent)
{
	double *best = malloc(n * sizeof(*best));
	bool *in = calloc(n, sizeof(*in));
	bool ok = best && in;
	for (size_t i = 0; ok && i < n; i++) {
		best[i] = INFINITY;
		parent[i] = 0;
	}
	size_t last = 0;
	if (ok)
		in[0] = true;
	for (size_t round = 1; ok && round < n; round++) {
		for (size_t i = 0; ok && i < n; i++) {
			double d;
			if (in[i])
				continue;
			ok = gp_geos_shape_distance(geos, parts[last], parts[i],
						    &d);
			if (ok && d < best[i]) {
				best[i] = d;
				parent[i] = last;
			}
		}
		size_t next = n;
		for (size_t i = 0; i < n; i++)
			if (!in[i] && (next == n || best[i] < best[next]))
				next = i;
		if (next == n)
			break;
		in[next] = true;
		last = next;
	}
	free(best);
	free(in);
	return ok;
}

bool gp_bridges_join(struct gp_geos *geos, const struct gp_polyset *parts,
		     int64_t width, const struct gp_keepout *keep,
		     size_t keep_count, struct gp_polyset *out,
		     size_t *unjoined, struct gp_point *where)
{
	*unjoined = 0;
	size_t n = parts->count;
	if (n < 2)
		return true;
	struct gp_geos_shape **shapes = calloc(n, sizeof(*shapes));
	size_t *parent = calloc(n, sizeof(*parent));
	bool ok = shapes && parent;
	for (size_t i = 0; ok && i < n; i++)
		ok = (shapes[i] = gp_geos_shape_from_polygon(
			      geos, &parts->items[i])) != NULL;
	ok = ok && spanning_tree(geos, shapes, n, parent);
	for (size_t i = 1; ok && i < n; i++) {
		bool found;
		ok = gp_bridge_find(geos, &parts->items[parent[i]],
				    &parts->items[i], width, keep, keep_count,
				    out, &found);
		if (ok && !found && (*unjoined)++ == 0) {
			struct gp_box a = gp_geos_shape_bounds(shapes[i]);
			struct gp_box b = gp_geos_shape_bounds(
				shapes[parent[i]]);
			*where = (struct gp_point){
				(a.x0 + a.x1 + b.x0 + b.x1) / 4,
				(a.y0 + a.y1 + b.y0 + b.y1) / 4 };
		}
	}
	for (size_t i = 0; shapes && i < n; i++)
		gp_geos_shape_destroy(geos, shapes[i]);
	free(shapes);
	free(parent);
	return ok;
}
