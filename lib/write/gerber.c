/* The Gerber RS-274X writer (see gerber.h).  Section numbers in comments
 * refer to the Gerber Layer Format Specification, Ucamco, revision
 * 2024.05 (numbers from memory: the rules are the spec's, the numbering
 * may be off by a subsection). */
#include "gerber.h"

#include "array.h"
#include "font.h"
#include "geos.h"
#include "units.h"

#include <glib.h>
#include <inttypes.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

/* Exact products of two coordinate differences need 128 bits. */
__extension__ typedef __int128 wide;

/* Largest coordinate the hole joiner accepts: keeps every product and sum
 * of products it forms far inside 128 bits. */
#define JOIN_COORD_MAX GP_LENGTH_MAX

static bool fail(const char **why, const char *text)
{
	if (why)
		*why = text;
	return false;
}

static bool same_point(struct gp_point a, struct gp_point b)
{
	return a.x == b.x && a.y == b.y;
}

/* (a - o) x (b - o): positive when o, a, b turn counter-clockwise. */
static wide orient(struct gp_point o, struct gp_point a, struct gp_point b)
{
	return (wide)(a.x - o.x) * (b.y - o.y) - (wide)(a.y - o.y) * (b.x - o.x);
}

static wide cross(struct gp_point a, struct gp_point b)
{
	return (wide)a.x * b.y - (wide)a.y * b.x;
}

static struct gp_point minus(struct gp_point a, struct gp_point b)
{
	return (struct gp_point){ a.x - b.x, a.y - b.y };
}

/* Twice the signed area, exact. */
static wide ring_area2(const struct gp_ring *ring)
{
	wide sum = 0;
	for (size_t i = 1; i + 1 < ring->count; i++)
		sum += orient(ring->points[0], ring->points[i],
			      ring->points[i + 1]);
	return sum;
}

static bool ring_in_range(const struct gp_ring *ring, int64_t limit)
{
	for (size_t i = 0; i < ring->count; i++) {
		const struct gp_point *p = &ring->points[i];
		if (p->x > limit || p->x < -limit || p->y > limit ||
		    p->y < -limit)
			return false;
	}
	return true;
}

/* Copy, drop repeated points, orient (counter-clockwise when ccw). */
static bool prepare_ring(struct gp_ring *dst, const struct gp_ring *src,
			 bool ccw, const char **why)
{
	if (!ring_in_range(src, JOIN_COORD_MAX))
		return fail(why, "a coordinate is out of range");
	if (!gp_ring_copy(dst, src))
		return fail(why, "out of memory");
	gp_ring_clean(dst);
	wide area2 = dst->count >= 3 ? ring_area2(dst) : 0;
	if (area2 == 0) {
		gp_ring_finish(dst);
		return fail(why, "a filled ring has no area");
	}
	if ((area2 > 0) != ccw)
		gp_ring_reverse(dst);
	return true;
}

/* p on the closed segment [a, b], given that a, b, p are collinear. */
static bool on_segment(struct gp_point a, struct gp_point b, struct gp_point p)
{
	return p.x >= (a.x < b.x ? a.x : b.x) && p.x <= (a.x > b.x ? a.x : b.x) &&
	       p.y >= (a.y < b.y ? a.y : b.y) && p.y <= (a.y > b.y ? a.y : b.y);
}

static int sign(wide v)
{
	return (v > 0) - (v < 0);
}

/* Do the closed segments [a, b] and [c, d] share any point? */
static bool segments_touch(struct gp_point a, struct gp_point b,
			   struct gp_point c, struct gp_point d)
{
	int d1 = sign(orient(c, d, a)), d2 = sign(orient(c, d, b));
	int d3 = sign(orient(a, b, c)), d4 = sign(orient(a, b, d));
	if (d1 * d2 < 0 && d3 * d4 < 0)
		return true;
	return (d1 == 0 && on_segment(c, d, a)) ||
	       (d2 == 0 && on_segment(c, d, b)) ||
	       (d3 == 0 && on_segment(a, b, c)) ||
	       (d4 == 0 && on_segment(a, b, d));
}

/* Is direction d strictly inside the material wedge at a vertex whose
 * neighbours are prev and next?  Material lies left of the ring's travel
 * (outer rings counter-clockwise, holes clockwise), so the wedge runs
 * counter-clockwise from the direction to next round to the direction to
 * prev. */
static bool in_wedge(struct gp_point vertex, struct gp_point prev,
		     struct gp_point next, struct gp_point towards)
{
	struct gp_point a = minus(prev, vertex), b = minus(next, vertex);
	struct gp_point d = minus(towards, vertex);
	wide turn = cross(b, a);
	if (turn > 0) /* convex: inside both half planes */
		return cross(b, d) > 0 && cross(d, a) > 0;
	if (turn == 0 && (wide)a.x * b.x + (wide)a.y * b.y < 0)
		return cross(b, d) > 0; /* straight */
	/* reflex (or a spike): outside the closed wedge from a to b */
	return !(cross(a, d) >= 0 && cross(d, b) >= 0);
}

static struct gp_point ring_at(const struct gp_ring *ring, size_t i)
{
	return ring->points[i % ring->count];
}

static struct gp_point ring_prev(const struct gp_ring *ring, size_t i)
{
	return ring->points[(i + ring->count - 1) % ring->count];
}

/* Does segment [m, p] touch ring only where allowed: at the point allow
 * (by coordinates; not along an edge), and along edge skip_edge (an edge
 * whose interior holds p), or nowhere when allow is NULL? */
static bool clear_of_ring(const struct gp_ring *ring, struct gp_point m,
			  struct gp_point p, const struct gp_point *allow,
			  size_t skip_edge)
{
	for (size_t i = 0; i < ring->count; i++) {
		if (i == skip_edge)
			continue;
		struct gp_point c = ring->points[i], d = ring_at(ring, i + 1);
		if (allow && (same_point(c, *allow) || same_point(d, *allow))) {
			struct gp_point other = same_point(c, *allow) ? d : c;
			if (orient(m, p, other) == 0 && on_segment(m, p, other))
				return false;
			continue;
		}
		if (segments_touch(m, p, c, d))
			return false;
	}
	return true;
}

struct hole_order {
	int64_t max_x;
	size_t index;
};

static int compare_holes(const void *pa, const void *pb)
{
	const struct hole_order *a = pa, *b = pb;
	if (a->max_x != b->max_x)
		return a->max_x > b->max_x ? -1 : 1;
	return a->index < b->index ? -1 : a->index > b->index;
}

/* Where a hole's cut-in lands on the merged ring: at vertex occurrence
 * `at`, or (insert) at point p put into the edge from `at` to at + 1.
 * When the ray from the hole meets that edge at whole nanometres p lies
 * on it; otherwise p is the last whole nanometre before the edge, on the
 * hole's side, and the edge bends through p: the region loses a sliver
 * less than 1 nm wide, and the cut-in stays exactly horizontal. */
struct bridge {
	size_t at;
	bool insert;
	bool bent;
	struct gp_point p;
};

struct join {
	struct gp_ring *merged;
	struct gp_ring *holes;      /* prepared, clockwise */
	struct gp_box *bounds;      /* of each hole */
	const struct hole_order *order;
	size_t hole_count;
	size_t done;                /* holes of order[] merged so far */
};

static struct gp_box segment_bounds(struct gp_point a, struct gp_point b)
{
	return gp_box_make(a.x, a.y, b.x, b.y);
}

static bool boxes_touch(struct gp_box a, struct gp_box b)
{
	return a.x0 <= b.x1 && b.x0 <= a.x1 && a.y0 <= b.y1 && b.y0 <= a.y1;
}

/* Does [m, p] stay clear of every hole not merged yet, touching the
 * current one (the first of them) only at allow, or nowhere when NULL? */
static bool clear_of_holes(const struct join *join, struct gp_point m,
			   struct gp_point p, const struct gp_point *allow)
{
	struct gp_box sb = segment_bounds(m, p);
	for (size_t k = join->done; k < join->hole_count; k++) {
		size_t index = join->order[k].index;
		if (!boxes_touch(sb, join->bounds[index]))
			continue;
		if (!clear_of_ring(&join->holes[index], m, p,
				   k == join->done ? allow : NULL, SIZE_MAX))
			return false;
	}
	return true;
}

static size_t occurrences(const struct gp_ring *ring, struct gp_point p)
{
	size_t n = 0;
	for (size_t i = 0; i < ring->count; i++)
		n += same_point(ring->points[i], p);
	return n;
}

/* q in the closed triangle a, b, c */
static bool in_triangle(struct gp_point a, struct gp_point b,
			struct gp_point c, struct gp_point q)
{
	int o1 = sign(orient(a, b, q)), o2 = sign(orient(b, c, q));
	int o3 = sign(orient(c, a, q));
	return (o1 >= 0 && o2 >= 0 && o3 >= 0) ||
	       (o1 <= 0 && o2 <= 0 && o3 <= 0);
}

/* The edge a-b of the merged ring (occurrence `edge`) bent through p:
 * the two new edges touch nothing but their neighbours at a and b, and
 * the sliver between them and the old edge holds no vertex. */
static bool bend_clear(const struct join *join, struct gp_point a,
		       struct gp_point p, struct gp_point b, size_t edge)
{
	const struct gp_ring *merged = join->merged;
	if (!clear_of_ring(merged, a, p, &a, edge) ||
	    !clear_of_ring(merged, p, b, &b, edge))
		return false;
	for (size_t i = 0; i < merged->count; i++) {
		struct gp_point v = merged->points[i];
		if (!same_point(v, a) && !same_point(v, b) &&
		    in_triangle(a, p, b, v))
			return false;
	}
	struct gp_box tb = gp_box_union(segment_bounds(a, p),
					segment_bounds(p, b));
	for (size_t k = join->done; k < join->hole_count; k++) {
		size_t index = join->order[k].index;
		const struct gp_ring *hole = &join->holes[index];
		if (!boxes_touch(tb, join->bounds[index]))
			continue;
		if (!clear_of_ring(hole, a, p, NULL, SIZE_MAX) ||
		    !clear_of_ring(hole, p, b, NULL, SIZE_MAX) ||
		    in_triangle(a, p, b, hole->points[0]))
			return false;
	}
	return true;
}

/* The nearest point where the ray from m along dir (+1 towards +x, -1
 * towards -x) meets the ring from the material side: at distance
 * q + r / den from m (0 <= r < den), on edge `edge`. */
struct hit {
	bool found;
	int64_t q;
	wide r, den;
	size_t edge;
};

static struct hit ray_hit(const struct gp_ring *ring, struct gp_point m,
			  int dir)
{
	struct hit best = { false, 0, 0, 1, 0 };
	for (size_t i = 0; i < ring->count; i++) {
		struct gp_point a = ring->points[i], b = ring_at(ring, i + 1);
		if ((a.y < m.y && b.y < m.y) || (a.y > m.y && b.y > m.y) ||
		    a.y == b.y)
			continue; /* horizontal edges: their ends are hit too */
		wide num = (wide)dir * ((wide)(a.x - m.x) * (b.y - a.y) +
					(wide)(m.y - a.y) * (b.x - a.x));
		wide den = (wide)b.y - a.y;
		if (den < 0) {
			num = -num;
			den = -den;
		}
		wide q = num / den, r = num % den;
		if (r < 0) {
			q -= 1;
			r += den;
		}
		if (q < 0 || (q == 0 && r == 0))
			continue;
		int64_t x = m.x + dir * (int64_t)q;
		/* a hit inside an edge counts from its material side only */
		bool at_end = r == 0 && ((x == a.x && m.y == a.y) ||
					 (x == b.x && m.y == b.y));
		if (!at_end && orient(a, b, m) <= 0)
			continue;
		if (!best.found || q < best.q ||
		    (q == best.q && r * best.den < best.r * den))
			best = (struct hit){ true, (int64_t)q, r, den, i };
	}
	return best;
}

/* A horizontal cut-in from hole vertex mi along dir.  It must leave the
 * hole and land into material, end at a point no other cut-in ends at
 * (spec 4.10.3: "points where more than two segments end" are not
 * allowed), and touch nothing on the way: "cut-ins can only touch or
 * overlap the contour in their start and end points".  The holes not
 * merged yet are not looked at for the first try (the rightmost vertex,
 * towards +x), which nothing of them lies beyond. */
static bool try_bridge(const struct join *join, const struct gp_ring *hole,
		       size_t mi, int dir, bool first, struct bridge *out)
{
	const struct gp_ring *merged = join->merged;
	struct gp_point m = hole->points[mi];
	struct hit h = ray_hit(merged, m, dir);
	if (!h.found || h.q == 0)
		return false; /* nothing there, or closer than 1 nm */
	struct gp_point p = { m.x + dir * h.q, m.y };
	struct gp_point a = merged->points[h.edge];
	struct gp_point b = ring_at(merged, h.edge + 1);
	if (h.r == 0 && (same_point(p, a) || same_point(p, b))) {
		size_t at = same_point(p, a) ? h.edge
					     : (h.edge + 1) % merged->count;
		*out = (struct bridge){ at, false, false, p };
		if (occurrences(merged, p) != 1 ||
		    !in_wedge(p, ring_prev(merged, at), ring_at(merged, at + 1),
			      m))
			return false;
	} else {
		*out = (struct bridge){ h.edge, true, h.r != 0, p };
		if (!in_wedge(p, a, b, m) ||
		    (out->bent && !bend_clear(join, a, p, b, h.edge)))
			return false;
	}
	if (!in_wedge(m, ring_prev(hole, mi), ring_at(hole, mi + 1), p))
		return false;
	if (!clear_of_ring(merged, m, p, out->insert ? NULL : &p,
			   out->insert ? h.edge : SIZE_MAX))
		return false;
	return first || clear_of_holes(join, m, p, &m);
}

static size_t max_x_vertex(const struct gp_ring *ring)
{
	size_t best = 0;
	for (size_t i = 1; i < ring->count; i++) {
		struct gp_point p = ring->points[i], q = ring->points[best];
		if (p.x > q.x || (p.x == q.x && p.y < q.y))
			best = i;
	}
	return best;
}

/* The rightmost vertex towards +x first; then every vertex both ways. */
static bool find_bridge(const struct join *join, const struct gp_ring *hole,
			size_t *mi, struct bridge *b)
{
	size_t start = max_x_vertex(hole);
	*mi = start;
	if (try_bridge(join, hole, start, 1, true, b))
		return true;
	for (int dir = 1; dir >= -1; dir -= 2)
		for (size_t k = 0; k < hole->count; k++) {
			*mi = (start + k) % hole->count;
			if (try_bridge(join, hole, *mi, dir, false, b))
				return true;
		}
	return false;
}

/* merged := merged with the hole spliced in through the bridge. */
static bool splice(struct gp_ring *merged, const struct gp_ring *hole,
		   size_t mi, const struct bridge *b)
{
	struct gp_ring next;
	gp_ring_init(&next);
	bool ok = true;
	for (size_t i = 0; i < merged->count; i++) {
		struct gp_point v = merged->points[i];
		ok = ok && gp_ring_push(&next, v.x, v.y);
		if (i != b->at)
			continue;
		if (b->insert)
			ok = ok && gp_ring_push(&next, b->p.x, b->p.y);
		for (size_t k = 0; k <= hole->count; k++) {
			struct gp_point h = ring_at(hole, mi + k);
			ok = ok && gp_ring_push(&next, h.x, h.y);
		}
		ok = ok && gp_ring_push(&next, b->p.x, b->p.y);
	}
	if (!ok) {
		gp_ring_finish(&next);
		return false;
	}
	gp_ring_finish(merged);
	*merged = next;
	return true;
}

static bool join_all(struct join *join, const char **why)
{
	for (; join->done < join->hole_count; join->done++) {
		const struct gp_ring *hole =
			&join->holes[join->order[join->done].index];
		size_t mi;
		struct bridge b;
		if (!find_bridge(join, hole, &mi, &b))
			return fail(why, "no horizontal cut-in joins a hole to "
					 "its outer ring (a hole touches the "
					 "ring or another hole)");
		if (!splice(join->merged, hole, mi, &b))
			return fail(why, "out of memory");
	}
	return true;
}

struct span {
	int64_t x0, x1;
	size_t index;
};

static int compare_spans(const void *pa, const void *pb)
{
	const struct span *a = pa, *b = pb;
	if (a->x0 != b->x0)
		return a->x0 < b->x0 ? -1 : 1;
	return a->index < b->index ? -1 : a->index > b->index;
}

enum meeting {
	MEET_ALLOWED,
	MEET_TOUCH, /* one's end on the other, at one point: self-touching */
	MEET_CROSS, /* crossing or overlapping */
};

/* May segments i < j of a contour meet as they do?  Spec 4.10.3: no
 * crossing or overlap, except a cut-in: "two fully-coincident linear
 * segments", and "cut-ins must be either horizontal or vertical"; "all
 * cut-ins in a contour must have the same direction" (ours are all
 * horizontal).  Segments may share a vertex but no more; where they do
 * is checked by points_allowed. */
static enum meeting segments_allowed(const struct gp_ring *r, size_t i,
				     size_t j)
{
	struct gp_point a = r->points[i], b = ring_at(r, i + 1);
	struct gp_point c = r->points[j], d = ring_at(r, j + 1);
	if (!segments_touch(a, b, c, d))
		return MEET_ALLOWED;
	if (same_point(a, d) && same_point(b, c))
		return a.y == b.y ? MEET_ALLOWED : MEET_CROSS; /* a cut-in */
	bool shared = same_point(a, c) || same_point(a, d) ||
		      same_point(b, c) || same_point(b, d);
	if (same_point(a, b) || same_point(c, d))
		return MEET_CROSS;
	if (!shared) {
		int d1 = sign(orient(c, d, a)), d2 = sign(orient(c, d, b));
		int d3 = sign(orient(a, b, c)), d4 = sign(orient(a, b, d));
		bool collinear = d1 == 0 && d2 == 0;
		bool proper = d1 * d2 < 0 && d3 * d4 < 0;
		return collinear || proper ? MEET_CROSS : MEET_TOUCH;
	}
	/* sharing a vertex: the far end of either may not lie on the other */
	struct gp_point c_far = same_point(c, a) || same_point(c, b) ? d : c;
	struct gp_point a_far = same_point(a, c) || same_point(a, d) ? b : a;
	return (orient(a, b, c_far) == 0 && on_segment(a, b, c_far)) ||
			       (orient(c, d, a_far) == 0 &&
				on_segment(c, d, a_far))
		       ? MEET_CROSS
		       : MEET_ALLOWED;
}

static int compare_occurrences(const void *pa, const void *pb)
{
	const struct span *a = pa, *b = pb; /* x0, x1 hold x, y */
	if (a->x0 != b->x0)
		return a->x0 < b->x0 ? -1 : 1;
	if (a->x1 != b->x1)
		return a->x1 < b->x1 ? -1 : 1;
	return a->index < b->index ? -1 : a->index > b->index;
}

/* Spec 4.10.3: "points where more than two segments end" are not
 * allowed, nor "any other form of self-touching".  A point the contour
 * passes twice must be one end of exactly one cut-in: at one pass the
 * contour leaves it for the cut-in's other end q, at the other it comes
 * back from q. */
static bool points_allowed(const struct gp_ring *r, const char **why)
{
	size_t n = r->count;
	struct span *list = malloc(n * sizeof(*list));
	if (!list)
		return fail(why, "out of memory");
	for (size_t i = 0; i < n; i++)
		list[i] = (struct span){ r->points[i].x, r->points[i].y, i };
	qsort(list, n, sizeof(*list), compare_occurrences);
	bool ok = true;
	for (size_t k = 0; k + 1 < n && ok; k++) {
		if (list[k].x0 != list[k + 1].x0 || list[k].x1 != list[k + 1].x1)
			continue;
		size_t i = list[k].index, j = list[k + 1].index;
		struct gp_point ni = ring_at(r, i + 1), pj = ring_prev(r, j);
		struct gp_point pi = ring_prev(r, i), nj = ring_at(r, j + 1);
		ok = (k + 2 >= n || list[k + 2].x0 != list[k].x0 ||
		      list[k + 2].x1 != list[k].x1) &&
		     ((same_point(ni, pj) && ni.y == r->points[i].y) ||
		      (same_point(pi, nj) && pi.y == r->points[i].y));
	}
	free(list);
	return ok ? true
		  : fail(why, "a filled shape's contour touches itself other "
			      "than at the ends of a cut-in");
}

/* Checks the joined contour (a sweep over x, so nearly linear for the
 * shapes we draw) against spec 4.10.3, whatever built it. */
static bool contour_valid(const struct gp_ring *r, const char **why)
{
	size_t n = r->count;
	if (!points_allowed(r, why))
		return false;
	struct span *spans = malloc(n * sizeof(*spans));
	if (!spans)
		return fail(why, "out of memory");
	for (size_t i = 0; i < n; i++) {
		int64_t xa = r->points[i].x, xb = ring_at(r, i + 1).x;
		spans[i] = (struct span){ xa < xb ? xa : xb, xa < xb ? xb : xa,
					  i };
	}
	qsort(spans, n, sizeof(*spans), compare_spans);
	enum meeting worst = MEET_ALLOWED;
	for (size_t k = 0; k < n && worst != MEET_CROSS; k++)
		for (size_t l = k + 1; l < n && worst != MEET_CROSS &&
				       spans[l].x0 <= spans[k].x1;
		     l++) {
			size_t i = spans[k].index, j = spans[l].index;
			enum meeting m = segments_allowed(r, i < j ? i : j,
							  i < j ? j : i);
			if (m > worst)
				worst = m;
		}
	free(spans);
	if (worst == MEET_TOUCH)
		return fail(why, "a filled shape's contour touches itself "
				 "(a hole touches the outer ring or another "
				 "hole)");
	return worst == MEET_ALLOWED
		       ? true
		       : fail(why, "a filled shape crosses itself, its holes "
				   "overlap or leave the outer ring, or a "
				   "cut-in is not horizontal");
}

/* Where p lies against ring: 1 inside, 0 on it, -1 outside (exact
 * crossing count of the ray towards +x). */
static int locate(const struct gp_ring *ring, struct gp_point p)
{
	bool inside = false;
	for (size_t i = 0; i < ring->count; i++) {
		struct gp_point a = ring->points[i], b = ring_at(ring, i + 1);
		wide o = orient(a, b, p);
		if (o == 0 && on_segment(a, b, p))
			return 0;
		if ((a.y > p.y) != (b.y > p.y) && (o > 0) == (b.y > a.y))
			inside = !inside;
	}
	return inside ? 1 : -1;
}

/* With no crossings (checked later), a hole is inside the outer ring when
 * any of its vertices off the ring is. */
static bool hole_inside(const struct gp_ring *outer, const struct gp_ring *hole)
{
	for (size_t i = 0; i < hole->count; i++) {
		int where = locate(outer, hole->points[i]);
		if (where != 0)
			return where > 0;
	}
	return false;
}

bool gp_gerber_join_holes(struct gp_ring *contour,
			  const struct gp_polygon *poly, const char **why)
{
	gp_ring_init(contour);
	size_t n = poly->hole_count;
	struct gp_ring *holes = calloc(n ? n : 1, sizeof(*holes));
	struct hole_order *order = calloc(n ? n : 1, sizeof(*order));
	struct gp_box *bounds = calloc(n ? n : 1, sizeof(*bounds));
	bool ok = false;
	if (!holes || !order || !bounds) {
		fail(why, "out of memory");
		goto out;
	}
	if (!prepare_ring(contour, &poly->outer, true, why))
		goto out;
	for (size_t i = 0; i < n; i++) {
		if (!prepare_ring(&holes[i], &poly->holes[i], false, why))
			goto out;
		if (!hole_inside(contour, &holes[i])) {
			fail(why, "a hole lies outside its outer ring");
			goto out;
		}
		order[i] = (struct hole_order){
			holes[i].points[max_x_vertex(&holes[i])].x, i };
		bounds[i] = gp_box_none();
		for (size_t k = 0; k < holes[i].count; k++)
			bounds[i] = gp_box_union(
				bounds[i], segment_bounds(holes[i].points[k],
							  holes[i].points[k]));
	}
	qsort(order, n, sizeof(*order), compare_holes);
	struct join join = { contour, holes, bounds, order, n, 0 };
	ok = join_all(&join, why) && contour_valid(contour, why);
out:
	for (size_t i = 0; holes && i < n; i++)
		gp_ring_finish(&holes[i]);
	free(holes);
	free(order);
	free(bounds);
	if (!ok)
		gp_ring_finish(contour);
	return ok;
}

/* --- regions that need more than one contour ----------------------------- */

/* Texts join_all and points_allowed give when a hole touches the ring
 * or another hole: no single valid contour exists, the region is split. */
static bool needs_split(const char *why)
{
	return why && (strncmp(why, "no horizontal cut-in", 20) == 0 ||
		       strncmp(why, "a filled shape's contour touches", 32) == 0);
}

void gp_gerber_contours_init(struct gp_gerber_contours *list)
{
	memset(list, 0, sizeof(*list));
}

void gp_gerber_contours_finish(struct gp_gerber_contours *list)
{
	for (size_t i = 0; i < list->count; i++)
		gp_ring_finish(&list->rings[i]);
	free(list->rings);
	gp_gerber_contours_init(list);
}

static bool contours_push(struct gp_gerber_contours *list,
			  struct gp_ring *ring)
{
	if (!gp_array_reserve(list->rings, list->capacity, list->count + 1))
		return false;
	list->rings[list->count++] = *ring;
	return true;
}

#define SPLIT_DEPTH_MAX 24

static bool add_contours(struct gp_gerber_contours *list,
			 const struct gp_polygon *poly, struct gp_geos *geos,
			 int depth, const char **why);

/* Cuts poly in two along a whole-nanometre line through the middle of its
 * first hole (horizontal, or vertical when the hole is under 2 nm tall or
 * every other time), with GEOS, and adds the pieces' contours.  Spec
 * 4.10.4.4: contours of one region may touch ("As these are two
 * different contours in the same region touching is allowed"). */
static bool split_contours(struct gp_gerber_contours *list,
			   const struct gp_polygon *poly, struct gp_geos *geos,
			   int depth, const char **why)
{
	struct gp_box hb = gp_polygon_bounds(&(struct gp_polygon){
		.outer = poly->holes[0] });
	struct gp_box all = gp_polygon_bounds(poly);
	bool tall = hb.y1 - hb.y0 >= 2, wide_enough = hb.x1 - hb.x0 >= 2;
	bool across = tall && (!wide_enough || depth % 2 == 0);
	if (!tall && !wide_enough)
		return fail(why, "a hole is smaller than 2 nm each way");
	int64_t cut = across ? hb.y0 + (hb.y1 - hb.y0) / 2
			     : hb.x0 + (hb.x1 - hb.x0) / 2;
	struct gp_box halves[2] = {
		across ? gp_box_make(all.x0 - 1, all.y0 - 1, all.x1 + 1, cut)
		       : gp_box_make(all.x0 - 1, all.y0 - 1, cut, all.y1 + 1),
		across ? gp_box_make(all.x0 - 1, cut, all.x1 + 1, all.y1 + 1)
		       : gp_box_make(cut, all.y0 - 1, all.x1 + 1, all.y1 + 1),
	};
	struct gp_polyset whole, half, pieces;
	gp_polyset_init(&whole);
	gp_polyset_init(&half);
	gp_polyset_init(&pieces);
	struct gp_polygon copy, box;
	gp_polygon_init(&box);
	bool ok = gp_polygon_copy(&copy, poly) && gp_polyset_take(&whole, &copy);
	for (int h = 0; ok && h < 2; h++) {
		ok = gp_polygon_set_box(&box, halves[h]) &&
		     gp_polyset_take(&half, &box) &&
		     gp_geos_intersection(geos, &whole, &half, &pieces);
		gp_polyset_finish(&half);
		gp_polyset_init(&half);
	}
	if (!ok)
		fail(why, "GEOS cannot split a region (is it valid?)");
	for (size_t i = 0; ok && i < pieces.count; i++)
		ok = add_contours(list, &pieces.items[i], geos, depth + 1, why);
	gp_polygon_finish(&box);
	gp_polyset_finish(&whole);
	gp_polyset_finish(&pieces);
	return ok;
}

static bool add_contours(struct gp_gerber_contours *list,
			 const struct gp_polygon *poly, struct gp_geos *geos,
			 int depth, const char **why)
{
	struct gp_ring contour;
	const char *reason = NULL;
	if (gp_gerber_join_holes(&contour, poly, &reason)) {
		if (contours_push(list, &contour))
			return true;
		gp_ring_finish(&contour);
		return fail(why, "out of memory");
	}
	if (!needs_split(reason) || depth >= SPLIT_DEPTH_MAX)
		return fail(why, reason);
	return split_contours(list, poly, geos, depth, why);
}

bool gp_gerber_region_contours(struct gp_gerber_contours *list,
			       const struct gp_polygon *poly,
			       const char **why)
{
	gp_gerber_contours_init(list);
	struct gp_ring contour;
	const char *reason = NULL;
	if (gp_gerber_join_holes(&contour, poly, &reason)) {
		if (contours_push(list, &contour))
			return true;
		gp_ring_finish(&contour);
		return fail(why, "out of memory");
	}
	if (!needs_split(reason))
		return fail(why, reason);
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_geos *geos = gp_geos_create(&diag);
	bool ok = geos ? split_contours(list, poly, geos, 0, why)
		       : fail(why, "out of memory");
	gp_geos_destroy(geos);
	gp_diag_finish(&diag);
	if (!ok)
		gp_gerber_contours_finish(list);
	return ok;
}

/* --- writing ------------------------------------------------------------ */

enum aperture_kind {
	APERTURE_CIRCLE,
	APERTURE_RECTANGLE,
};

struct aperture {
	enum aperture_kind kind;
	int64_t a, b; /* circle: diameter; rectangle: width, height */
	const char *function; /* .AperFunction value (static text) */
};

struct writer {
	struct gp_buffer *out;
	const struct gp_gerber_info *info;
	enum gp_layer layer;
	const char **why;           /* &reason */
	const char *reason;         /* static text of the first failure */
	char *message;              /* what the caller sees */
	size_t message_size;
	struct aperture *apertures;
	size_t count, capacity;
	long current;               /* D code selected, 0 for none */
	const char *region_function;/* .AperFunction in the dictionary */
	int net;                    /* .N in the dictionary: net, or
				     * GP_NET_NONE for "none", -2 unset */
	bool attributes;            /* some object attribute was set */
	bool mirrored;              /* x becomes 2 * axis - x */
	int64_t axis;
};

#define NET_UNSET (-2)

/* Placeholder aperture for a file with regions only: some readers expect
 * every file to define one (10 um circle, never drawn with). */
#define PLACEHOLDER_DIAMETER INT64_C(10000)
#define FIRST_D_CODE 10 /* D10 is the first free code (section 4.3) */

static bool is_ito(enum gp_layer layer)
{
	return layer == GP_LAYER_FRONT_ITO || layer == GP_LAYER_BACK_ITO;
}

static bool is_outline(enum gp_layer layer)
{
	return layer == GP_LAYER_FRONT_OUTLINE ||
	       layer == GP_LAYER_BACK_OUTLINE;
}

static const char *plate_word(enum gp_layer layer)
{
	return gp_layer_plate(layer) == GP_PLATE_FRONT ? "front" : "back";
}

/* Spec 5.6.10 .AperFunction: on the ITO (the glass's conductor layers)
 * "ConnectorPad" ("An edge connector pad"), "NonConductor" ("typically
 * text in the PCB such as a part number"; also the alignment marks),
 * "Conductor" for the rest; "Profile" for the cut outline ("the draws
 * and arcs that exactly define the profile or outline"); "Material" on
 * the print layers ("Identifies the proper part of the data file"). */
static const char *shape_function(const struct gp_shape *s)
{
	if (is_outline(s->layer))
		return "Profile";
	if (!is_ito(s->layer))
		return "Material";
	switch (s->role) {
	case GP_ROLE_PAD:
		return "ConnectorPad";
	case GP_ROLE_TEXT:
	case GP_ROLE_MARK:
		return "NonConductor";
	default:
		return "Conductor";
	}
}

/* One function, one aperture (5.6.10): the function is part of the key. */
static long aperture_code(struct writer *w, enum aperture_kind kind,
			  int64_t a, int64_t b, const char *function, bool add)
{
	for (size_t i = 0; i < w->count; i++)
		if (w->apertures[i].kind == kind && w->apertures[i].a == a &&
		    w->apertures[i].b == b &&
		    strcmp(w->apertures[i].function, function) == 0)
			return FIRST_D_CODE + (long)i;
	if (!add)
		return 0;
	if (!gp_array_reserve(w->apertures, w->capacity, w->count + 1))
		return 0;
	w->apertures[w->count] = (struct aperture){ kind, a, b, function };
	return FIRST_D_CODE + (long)w->count++;
}

/* A pad that is an axis-aligned rectangle with an exact centre. */
static bool flashable_pad(const struct gp_shape *shape, struct gp_box *box)
{
	const struct gp_ring *r = &shape->poly.outer;
	if (shape->role != GP_ROLE_PAD || shape->line_width > 0 ||
	    shape->poly.hole_count > 0)
		return false;
	size_t distinct = 0;
	struct gp_point pts[4];
	for (size_t i = 0; i < r->count; i++) {
		struct gp_point p = r->points[i];
		if (distinct > 0 && (same_point(p, pts[distinct - 1]) ||
				     (i + 1 == r->count &&
				      same_point(p, pts[0]))))
			continue;
		if (distinct == 4)
			return false;
		pts[distinct++] = p;
	}
	if (distinct != 4)
		return false;
	*box = gp_box_make(pts[0].x, pts[0].y, pts[2].x, pts[2].y);
	for (size_t i = 0; i < 4; i++) {
		struct gp_point p = pts[i], q = pts[(i + 1) % 4];
		bool corner = (p.x == box->x0 || p.x == box->x1) &&
			      (p.y == box->y0 || p.y == box->y1);
		/* each edge along exactly one axis, every point a corner */
		if ((p.x == q.x) == (p.y == q.y) || !corner)
			return false;
	}
	return gp_box_width(*box) > 0 && gp_box_height(*box) > 0 &&
	       (box->x0 + box->x1) % 2 == 0 && (box->y0 + box->y1) % 2 == 0;
}

/* How a shape is drawn. */
enum drawing {
	DRAW_STROKE,
	DRAW_FLASH_RECTANGLE,
	DRAW_FLASH_CIRCLE,
	DRAW_REGION,
};

static enum drawing drawing_of(const struct gp_shape *s, struct gp_box *box)
{
	if (s->line_width > 0)
		return DRAW_STROKE;
	if (s->flash_diameter > 0)
		return DRAW_FLASH_CIRCLE;
	if (flashable_pad(s, box))
		return DRAW_FLASH_RECTANGLE;
	return DRAW_REGION;
}

static long shape_aperture(struct writer *w, const struct gp_shape *s,
			   bool add)
{
	struct gp_box box;
	const char *function = shape_function(s);
	switch (drawing_of(s, &box)) {
	case DRAW_STROKE:
		return aperture_code(w, APERTURE_CIRCLE, s->line_width, 0,
				     function, add);
	case DRAW_FLASH_CIRCLE:
		return aperture_code(w, APERTURE_CIRCLE, s->flash_diameter, 0,
				     function, add);
	case DRAW_FLASH_RECTANGLE:
		return aperture_code(w, APERTURE_RECTANGLE, gp_box_width(box),
				     gp_box_height(box), function, add);
	default:
		return -1;
	}
}

static bool collect_apertures(struct writer *w, const struct gp_artwork *art,
			      enum gp_layer layer)
{
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->layer == layer && shape_aperture(w, s, true) == 0)
			return fail(w->why, "out of memory");
	}
	if (w->count == 0 &&
	    !aperture_code(w, APERTURE_CIRCLE, PLACEHOLDER_DIAMETER, 0,
			   "Other,unused", true))
		return fail(w->why, "out of memory");
	return true;
}

/* Comment and attribute text (spec 3.4.3): the reserved characters '%',
 * '*', '\' and the field separator ',' escaped, and, since "all
 * characters in a Gerber file are restricted to the readable ASCII
 * characters, with codes 32 to 126" outside attribute values (3.1), every
 * other character as a Unicode escape: \uXXXX, or \UXXXXXXXX beyond
 * 16 bits.  A byte that is not UTF-8 is written as U+FFFD. */
static void put_text(struct gp_buffer *out, const char *text)
{
	const char *p = text;
	while (*p) {
		uint32_t code;
		size_t length = gp_utf8_decode(p, &code);
		if (length == 0) {
			code = 0xFFFD;
			length = 1;
		}
		if (code == ',' || code == '*' || code == '%' || code == '\\' ||
		    code < 0x20 || code >= 0x7f)
			gp_buffer_printf(out, code > 0xFFFF ? "\\U%08" PRIX32
							    : "\\u%04" PRIX32,
					 code);
		else
			gp_buffer_append(out, p, 1);
		p += length;
	}
}

/* .FileFunction (5.6.3): "Profile,NP" for a plate's cut outline ("A file
 * containing the board profile (or outline) and only the board profile";
 * the plates have no plated edges); "Other,<mandatory field>" for the
 * rest ("Another data layer then the ones above. The mandatory field
 * informally describes it"), none of the PCB layer functions fitting:
 * the layer's name and the side it is seen from. */
static void put_file_function(struct writer *w)
{
	struct gp_buffer *out = w->out;
	if (is_outline(w->layer)) {
		gp_buffer_puts(out, "%TF.FileFunction,Profile,NP*%\n");
		return;
	}
	gp_buffer_puts(out, "%TF.FileFunction,Other,");
	put_text(out, gp_layer_name(w->layer));
	if (!w->info || w->info->face == GP_GERBER_FACE_VIEWER)
		gp_buffer_puts(out, " seen from the viewer");
	else
		gp_buffer_printf(out, " seen from the coated face of the %s "
				 "plate%s", plate_word(w->layer),
				 w->mirrored ? " (mirrored)" : "");
	gp_buffer_puts(out, "*%\n");
}

/* The side the file is drawn from, in words, as a G04 comment (4.1). */
static void put_side(struct writer *w)
{
	struct gp_buffer *out = w->out;
	const char *plate = plate_word(w->layer);
	bool front = gp_layer_plate(w->layer) == GP_PLATE_FRONT;
	if (!is_ito(w->layer) && !is_outline(w->layer) && !front)
		gp_buffer_puts(out, "G04 Printed on the coated face of the "
				    "back plate*\n");
	if (w->mirrored) {
		char axis[40];
		gp_format_mm_short(axis, sizeof(axis), w->axis);
		gp_buffer_printf(out, "G04 Seen from the coated face of the "
				 "front plate: the viewer's drawing mirrored "
				 "about the vertical line X = %s mm*\n", axis);
	} else if (w->info && w->info->face == GP_GERBER_FACE_COATED)
		gp_buffer_printf(out, "G04 Seen from the coated face of the "
				 "%s plate, as the viewer sees it: not "
				 "mirrored*\n", plate);
	else if (front)
		gp_buffer_puts(out, "G04 Seen from the viewer, through the "
				    "front plate (its coated face looks away "
				    "from the viewer): not mirrored*\n");
	else
		gp_buffer_puts(out, "G04 Seen from the viewer, who faces the "
				    "coated face of the back plate: not "
				    "mirrored*\n");
}

/* .ProjectId (5.6.8): "<Name>,<GUID>,<Revision>"; the GUID is a
 * name-based one (RFC 4122 section 4.3, SHA-1, version 5) of the part
 * number in the URL name space, so every file of a part carries the same
 * one and a rebuild gives the same bytes. */
static void put_project(struct writer *w)
{
	const struct gp_gerber_info *info = w->info;
	if (!info || !info->part_number || !info->part_number[0])
		return;
	static const unsigned char url_space[16] = {
		0x6b, 0xa7, 0xb8, 0x11, 0x9d, 0xad, 0x11, 0xd1,
		0x80, 0xb4, 0x00, 0xc0, 0x4f, 0xd4, 0x30, 0xc8,
	};
	GChecksum *sha = g_checksum_new(G_CHECKSUM_SHA1);
	if (!sha)
		return;
	g_checksum_update(sha, url_space, sizeof(url_space));
	static const char prefix[] = "glassplot:part/";
	g_checksum_update(sha, (const guchar *)prefix, sizeof(prefix) - 1);
	g_checksum_update(sha, (const guchar *)info->part_number,
			  (gssize)strlen(info->part_number));
	guint8 digest[20];
	gsize length = sizeof(digest);
	g_checksum_get_digest(sha, digest, &length);
	g_checksum_free(sha);
	digest[6] = (guint8)((digest[6] & 0x0f) | 0x50);
	digest[8] = (guint8)((digest[8] & 0x3f) | 0x80);
	gp_buffer_puts(w->out, "%TF.ProjectId,");
	put_text(w->out, info->part_number);
	gp_buffer_puts(w->out, ",");
	for (int i = 0; i < 16; i++)
		gp_buffer_printf(w->out, "%s%02x",
				 i == 4 || i == 6 || i == 8 || i == 10 ? "-" : "",
				 digest[i]);
	gp_buffer_puts(w->out, ",");
	put_text(w->out, info->revision && info->revision[0] ? info->revision
							      : "0");
	gp_buffer_puts(w->out, "*%\n");
}

static void write_header(struct writer *w)
{
	struct gp_buffer *out = w->out;
	const struct gp_gerber_info *info = w->info;
	const char *part = info && info->part_number ? info->part_number : NULL;
	gp_buffer_puts(out, "G04 ");
	put_text(out, gp_layer_title(w->layer));
	if (part) {
		gp_buffer_puts(out, " of glass ");
		put_text(out, part);
	}
	gp_buffer_puts(out, "*\n");
	put_side(w);
	/* format and unit first, before any coordinate (sections 4.2, 4.1) */
	gp_buffer_puts(out, "%FSLAX46Y46*%\n%MOMM*%\n");
	/* file attributes (section 5.6) */
	gp_buffer_puts(out, "%TF.GenerationSoftware,glassplot,glassplot,");
	put_text(out, info && info->version ? info->version : "0");
	gp_buffer_puts(out, "*%\n");
	if (info && info->creation_date) {
		gp_buffer_puts(out, "%TF.CreationDate,");
		put_text(out, info->creation_date);
		gp_buffer_puts(out, "*%\n");
	}
	put_project(w);
	put_file_function(w);
	gp_buffer_puts(out, "%TF.FilePolarity,Positive*%\n");
	gp_buffer_puts(out, "%TF.Part,Single*%\n");
	gp_buffer_puts(out, "%TF.SameCoordinates");
	if (part || w->mirrored)
		gp_buffer_puts(out, ",");
	if (part)
		put_text(out, part);
	if (w->mirrored)
		gp_buffer_puts(out, part ? " mirrored" : "mirrored");
	gp_buffer_puts(out, "*%\n%LPD*%\nG01*\n");
	/* each aperture defined with its function in the dictionary (5.3) */
	const char *function = NULL;
	for (size_t i = 0; i < w->count; i++) {
		const struct aperture *a = &w->apertures[i];
		char sa[40], sb[40];
		if (!function || strcmp(function, a->function) != 0)
			gp_buffer_printf(out, "%%TA.AperFunction,%s*%%\n",
					 a->function);
		function = a->function;
		gp_format_mm(sa, sizeof(sa), a->a);
		gp_format_mm(sb, sizeof(sb), a->b);
		if (a->kind == APERTURE_CIRCLE)
			gp_buffer_printf(out, "%%ADD%dC,%s*%%\n",
					 FIRST_D_CODE + (int)i, sa);
		else
			gp_buffer_printf(out, "%%ADD%dR,%sX%s*%%\n",
					 FIRST_D_CODE + (int)i, sa, sb);
	}
	w->region_function = function;
}

static bool put_point(struct writer *w, struct gp_point p, int operation)
{
	if (w->mirrored) {
		wide x = 2 * (wide)w->axis - p.x;
		if (x > GP_GERBER_COORD_MAX || x < -GP_GERBER_COORD_MAX)
			return fail(w->why, "a coordinate is beyond "
					    "9999.999999 mm, the range of "
					    "Gerber format 4.6");
		p.x = (int64_t)x;
	}
	if (p.x > GP_GERBER_COORD_MAX || p.x < -GP_GERBER_COORD_MAX ||
	    p.y > GP_GERBER_COORD_MAX || p.y < -GP_GERBER_COORD_MAX)
		return fail(w->why, "a coordinate is beyond 9999.999999 mm, "
				    "the range of Gerber format 4.6");
	gp_buffer_printf(w->out, "X%" PRId64 "Y%" PRId64 "D%02d*\n", p.x, p.y,
			 operation);
	return true;
}

static void select_aperture(struct writer *w, long code)
{
	if (code != w->current)
		gp_buffer_printf(w->out, "D%ld*\n", code);
	w->current = code;
}

static bool write_stroke(struct writer *w, const struct gp_shape *s)
{
	const struct gp_ring *r = &s->poly.outer;
	if (r->count == 0)
		return fail(w->why, "a line has no points");
	if (!ring_in_range(r, GP_GERBER_COORD_MAX))
		return fail(w->why, "a coordinate is beyond 9999.999999 mm, "
				    "the range of Gerber format 4.6");
	select_aperture(w, shape_aperture(w, s, false));
	struct gp_point first = r->points[0], last = first;
	size_t drawn = 0;
	bool ok = put_point(w, first, 2);
	for (size_t i = 1; ok && i <= r->count; i++) {
		if (i == r->count && s->open_path)
			break;
		struct gp_point p = i == r->count ? first : r->points[i];
		if (same_point(p, last))
			continue; /* no zero-length draws */
		ok = put_point(w, p, 1);
		last = p;
		drawn++;
	}
	if (ok && drawn == 0) /* a single point: a dot */
		ok = put_point(w, first, 3);
	return ok;
}

static bool write_region(struct writer *w, const struct gp_shape *s)
{
	struct gp_gerber_contours list;
	if (!gp_gerber_region_contours(&list, &s->poly, w->why))
		return false;
	bool ok = true;
	for (size_t c = 0; ok && c < list.count; c++)
		ok = ring_in_range(&list.rings[c], GP_GERBER_COORD_MAX);
	/* regions take their function from the dictionary (5.3.1) */
	const char *function = shape_function(s);
	if (ok && (!w->region_function ||
		   strcmp(w->region_function, function) != 0))
		gp_buffer_printf(w->out, "%%TA.AperFunction,%s*%%\n", function);
	w->region_function = function;
	/* each contour closed exactly on its first point (section 4.10) */
	if (ok)
		gp_buffer_puts(w->out, "G36*\n");
	for (size_t c = 0; ok && c < list.count; c++)
		for (size_t i = 0; ok && i <= list.rings[c].count; i++)
			ok = put_point(w, ring_at(&list.rings[c], i),
				       i == 0 ? 2 : 1);
	if (ok)
		gp_buffer_puts(w->out, "G37*\n");
	else
		fail(w->why, "a coordinate is beyond 9999.999999 mm, the "
			     "range of Gerber format 4.6");
	gp_gerber_contours_finish(&list);
	return ok;
}

static bool write_flash(struct writer *w, const struct gp_shape *s,
			struct gp_box box)
{
	select_aperture(w, shape_aperture(w, s, false));
	struct gp_point centre =
		s->flash_diameter > 0
			? s->flash_centre
			: (struct gp_point){ (box.x0 + box.x1) / 2,
					     (box.y0 + box.y1) / 2 };
	return put_point(w, centre, 3);
}

/* .N (5.6.13): "It is recommended to attach a .N attribute to all copper
 * objects, also those without net", the empty name for those; written on
 * the ITO, the glass's conductors. */
static void put_net(struct writer *w, const struct gp_artwork *art,
		    const struct gp_shape *s)
{
	if (!is_ito(s->layer))
		return;
	int net = s->net >= 0 && (size_t)s->net < art->net_count ? s->net
								 : GP_NET_NONE;
	if (net == w->net)
		return;
	gp_buffer_puts(w->out, "%TO.N,");
	if (net >= 0)
		put_text(w->out, art->nets[net].name);
	gp_buffer_puts(w->out, "*%\n");
	w->net = net;
	w->attributes = true;
}

/* .P (5.6.14): "<refdes>,<number>[,<function>]" on a ledge pad: the
 * ledge's name, the pin number and the net; false when the pad is no
 * pin. */
static bool put_pin(struct writer *w, const struct gp_artwork *art,
		    const struct gp_shape *s, struct gp_box box)
{
	const struct gp_gerber_info *info = w->info;
	if (!info || s->role != GP_ROLE_PAD || !is_ito(s->layer))
		return false;
	for (size_t i = 0; i < info->pin_count; i++) {
		const struct gp_gerber_pin *pin = &info->pins[i];
		if (pin->box.x0 != box.x0 || pin->box.y0 != box.y0 ||
		    pin->box.x1 != box.x1 || pin->box.y1 != box.y1)
			continue;
		gp_buffer_puts(w->out, "%TO.P,");
		put_text(w->out, pin->refdes ? pin->refdes : "LEDGE");
		gp_buffer_printf(w->out, ",%d", pin->number);
		if (s->net >= 0 && (size_t)s->net < art->net_count) {
			gp_buffer_puts(w->out, ",");
			put_text(w->out, art->nets[s->net].name);
		}
		gp_buffer_puts(w->out, "*%\n");
		w->attributes = true;
		return true;
	}
	return false;
}

/* The error names the shape: its role, net and lower left corner. */
static bool shape_error(struct writer *w, const struct gp_artwork *art,
			const struct gp_shape *s)
{
	char x[32], y[32];
	struct gp_box box = gp_polygon_bounds(&s->poly);
	gp_format_mm_short(x, sizeof(x), box.x0);
	gp_format_mm_short(y, sizeof(y), box.y0);
	bool named = s->net >= 0 && (size_t)s->net < art->net_count;
	snprintf(w->message, w->message_size, "the %s%s%s from (%s, %s) mm: %s",
		 gp_role_name(s->role), named ? " of " : "",
		 named ? art->nets[s->net].name : "", x, y,
		 w->reason ? w->reason : "out of memory");
	return false;
}

static bool write_shapes(struct writer *w, const struct gp_artwork *art,
			 enum gp_layer layer)
{
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		struct gp_box box;
		bool ok, pin = false;
		if (s->layer != layer)
			continue;
		put_net(w, art, s);
		switch (drawing_of(s, &box)) {
		case DRAW_STROKE:
			ok = write_stroke(w, s);
			break;
		case DRAW_FLASH_RECTANGLE:
			pin = put_pin(w, art, s, box);
			ok = write_flash(w, s, box);
			break;
		case DRAW_FLASH_CIRCLE:
			ok = write_flash(w, s, box);
			break;
		default:
			ok = write_region(w, s);
			break;
		}
		if (pin)
			gp_buffer_puts(w->out, "%TD.P*%\n");
		if (!ok)
			return shape_error(w, art, s);
	}
	if (w->attributes)
		gp_buffer_puts(w->out, "%TD*%\n");
	return true;
}

/* .MD5 (5.6.9): "calculated over the bits from the beginning of the file
 * up to but excluding the .MD5 file attribute command itself ... Any CR
 * and LF are excluded". */
static void put_md5(struct gp_buffer *out, size_t start)
{
	GChecksum *md5 = g_checksum_new(G_CHECKSUM_MD5);
	if (!md5)
		return;
	const char *p = out->data + start, *end = out->data + out->size;
	while (p < end) {
		size_t run = strcspn(p, "\r\n");
		if (p + run > end)
			run = (size_t)(end - p);
		g_checksum_update(md5, (const guchar *)p, (gssize)run);
		p += run;
		while (p < end && (*p == '\r' || *p == '\n'))
			p++;
	}
	gp_buffer_printf(out, "%%TF.MD5,%s*%%\n", g_checksum_get_string(md5));
	g_checksum_free(md5);
}

bool gp_gerber_write_why(struct gp_buffer *out, const struct gp_artwork *art,
			 enum gp_layer layer,
			 const struct gp_gerber_info *info, char *why,
			 size_t why_size)
{
	char scratch[8];
	struct writer w = { .out = out, .info = info, .layer = layer,
			    .message = why ? why : scratch,
			    .message_size = why ? why_size : sizeof(scratch),
			    .net = NET_UNSET };
	w.why = &w.reason;
	w.message[0] = '\0';
	w.mirrored = info && info->face == GP_GERBER_FACE_COATED &&
		     gp_layer_plate(layer) == GP_PLATE_FRONT;
	w.axis = info ? info->mirror_axis : 0;
	size_t start = out->size;
	bool ok = collect_apertures(&w, art, layer);
	if (ok) {
		write_header(&w);
		ok = write_shapes(&w, art, layer);
	}
	if (ok && !out->failed) {
		put_md5(out, start);
		gp_buffer_puts(out, "M02*\n"); /* section 4.13 */
	}
	if (ok && out->failed)
		ok = fail(w.why, "out of memory");
	if (!ok && !w.message[0])
		snprintf(w.message, w.message_size, "%s",
			 w.reason ? w.reason : "out of memory");
	free(w.apertures);
	return ok;
}

bool gp_gerber_format_date(char *buffer, size_t size, int64_t epoch)
{
	/* years 0..9999 only, so the text keeps its fixed width */
	if (epoch < INT64_C(-62167219200) || epoch > INT64_C(253402300799))
		return false;
	time_t t = (time_t)epoch;
	struct tm tm;
	if (!gmtime_r(&t, &tm))
		return false;
	int n = snprintf(buffer, size, "%04d-%02d-%02dT%02d:%02d:%02d+00:00",
			 tm.tm_year + 1900, tm.tm_mon + 1, tm.tm_mday,
			 tm.tm_hour, tm.tm_min, tm.tm_sec);
	return n > 0 && (size_t)n < size;
}
