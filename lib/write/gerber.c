/* The Gerber RS-274X writer (see gerber.h).  Section numbers in comments
 * refer to the Gerber Layer Format Specification, Ucamco, revision
 * 2024.05 (numbers from memory: the rules are the spec's, the numbering
 * may be off by a subsection). */
#include "gerber.h"

#include "escape.h"

#include "units.h"

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
 * `at`, or (insert) at point p inside the edge from `at` to at + 1. */
struct bridge {
	size_t at;
	bool insert;
	struct gp_point p;
};

struct join {
	struct gp_ring *merged;
	struct gp_ring *holes;      /* prepared, clockwise */
	const struct hole_order *order;
	size_t hole_count;
	size_t done;                /* holes of order[] merged so far */
};

/* Does [m, p] stay clear of the current hole (except at m) and of every
 * hole not merged yet? */
static bool clear_of_holes(const struct join *join, size_t current,
			   struct gp_point m, struct gp_point p)
{
	for (size_t k = join->done; k < join->hole_count; k++) {
		const struct gp_ring *hole = &join->holes[join->order[k].index];
		if (!clear_of_ring(hole, m, p, k == current ? &m : NULL,
				   SIZE_MAX))
			return false;
	}
	return true;
}

/* A cut-in from hole vertex m (occurrence mi of hole) to b is valid when
 * it leaves both rings into material and crosses nothing.  The crossing
 * test is skipped (clear = false) for the horizontal cut-in to the nearest
 * point the ray meets: nothing lies between by construction (holes not
 * yet joined lie at x <= m.x), and contour_valid checks the end result. */
static bool bridge_ok(const struct join *join, const struct gp_ring *hole,
		      size_t mi, const struct bridge *b, bool clear)
{
	const struct gp_ring *merged = join->merged;
	struct gp_point m = hole->points[mi];
	if (!in_wedge(m, ring_prev(hole, mi), ring_at(hole, mi + 1), b->p))
		return false;
	if (b->insert) {
		/* material lies left of the edge: m must be on that side */
		if (orient(merged->points[b->at], ring_at(merged, b->at + 1),
			   m) <= 0)
			return false;
	} else if (!in_wedge(b->p, ring_prev(merged, b->at),
			     ring_at(merged, b->at + 1), m)) {
		return false;
	}
	if (!clear)
		return true;
	if (!clear_of_ring(merged, m, b->p, &b->p,
			   b->insert ? b->at : SIZE_MAX))
		return false;
	return clear_of_holes(join, join->done, m, b->p);
}

/* Nearest point where the ray from m towards +x meets the merged ring, if
 * it has integer coordinates: a horizontal cut-in there is exact. */
static bool horizontal_bridge(const struct join *join,
			      const struct gp_ring *hole, size_t mi,
			      struct bridge *out)
{
	const struct gp_ring *merged = join->merged;
	struct gp_point m = hole->points[mi];
	bool found = false;
	int64_t best_q = 0;
	wide best_r = 0, best_den = 1;
	size_t best_edge = 0;
	for (size_t i = 0; i < merged->count; i++) {
		struct gp_point a = merged->points[i], b = ring_at(merged, i + 1);
		if ((a.y < m.y && b.y < m.y) || (a.y > m.y && b.y > m.y) ||
		    a.y == b.y)
			continue; /* horizontal edges: their ends are hit too */
		wide num = (wide)(m.y - a.y) * (b.x - a.x);
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
		int64_t x = a.x + (int64_t)q;
		if (x < m.x || (x == m.x && r == 0))
			continue;
		/* a hit inside an edge counts from the edge's material side
		 * only: of a cut-in's two copies, the one facing m */
		bool at_end = r == 0 && ((x == a.x && m.y == a.y) ||
					 (x == b.x && m.y == b.y));
		if (!at_end && orient(a, b, m) <= 0)
			continue;
		if (!found || x < best_q ||
		    (x == best_q && r * best_den < best_r * den)) {
			found = true;
			best_q = x;
			best_r = r;
			best_den = den;
			best_edge = i;
		}
	}
	if (!found || best_r != 0)
		return false;
	struct gp_point p = { best_q, m.y };
	for (size_t j = 0; j < merged->count; j++) {
		if (!same_point(merged->points[j], p))
			continue;
		*out = (struct bridge){ j, false, p };
		if (bridge_ok(join, hole, mi, out, false))
			return true;
	}
	struct gp_point a = merged->points[best_edge];
	struct gp_point b = ring_at(merged, best_edge + 1);
	if (same_point(a, p) || same_point(b, p))
		return false;
	*out = (struct bridge){ best_edge, true, p };
	return bridge_ok(join, hole, mi, out, false);
}

struct candidate {
	wide distance2;
	size_t at;
};

static int compare_candidates(const void *pa, const void *pb)
{
	const struct candidate *a = pa, *b = pb;
	if (a->distance2 != b->distance2)
		return a->distance2 < b->distance2 ? -1 : 1;
	return a->at < b->at ? -1 : a->at > b->at;
}

/* Any vertex of the merged ring that m sees, nearest first.  Some vertex
 * always qualifies for a valid polygon (Eberly, "Triangulation by Ear
 * Clipping", 2002, section 3), so this only fails on invalid input. */
static bool vertex_bridge(const struct join *join, const struct gp_ring *hole,
			  size_t mi, struct bridge *out, const char **why)
{
	const struct gp_ring *merged = join->merged;
	struct gp_point m = hole->points[mi];
	struct candidate *list = malloc(merged->count * sizeof(*list));
	if (!list)
		return fail(why, "out of memory");
	for (size_t j = 0; j < merged->count; j++) {
		struct gp_point d = minus(merged->points[j], m);
		list[j] = (struct candidate){
			(wide)d.x * d.x + (wide)d.y * d.y, j };
	}
	qsort(list, merged->count, sizeof(*list), compare_candidates);
	bool found = false;
	for (size_t k = 0; k < merged->count && !found; k++) {
		struct gp_point p = merged->points[list[k].at];
		*out = (struct bridge){ list[k].at, false, p };
		/* a hole touching the ring at a vertex joins there directly */
		found = list[k].distance2 == 0 ||
			bridge_ok(join, hole, mi, out, true);
	}
	free(list);
	return found ? true
		     : fail(why, "a hole cannot be joined to its outer ring "
				 "(holes overlap or cross the outer ring)");
}

/* The other copy of edge `at` when that edge is one side of a cut-in
 * (the same segment run the other way), or SIZE_MAX. */
static size_t twin_edge(const struct gp_ring *ring, size_t at)
{
	struct gp_point a = ring->points[at], b = ring_at(ring, at + 1);
	for (size_t i = 0; i < ring->count; i++)
		if (same_point(ring->points[i], b) &&
		    same_point(ring_at(ring, i + 1), a))
			return i;
	return SIZE_MAX;
}

/* merged := merged with the hole spliced in through the bridge.  A point
 * inserted into a cut-in goes into both its copies, so that they stay
 * fully coincident. */
static bool splice(struct gp_ring *merged, const struct gp_ring *hole,
		   size_t mi, const struct bridge *b)
{
	struct gp_ring next;
	gp_ring_init(&next);
	bool ok = true;
	struct gp_point m = hole->points[mi];
	bool touching = same_point(m, b->p);
	size_t twin = b->insert ? twin_edge(merged, b->at) : SIZE_MAX;
	for (size_t i = 0; i < merged->count; i++) {
		struct gp_point v = merged->points[i];
		ok = ok && gp_ring_push(&next, v.x, v.y);
		if (i == twin)
			ok = ok && gp_ring_push(&next, b->p.x, b->p.y);
		if (i != b->at)
			continue;
		if (b->insert)
			ok = ok && gp_ring_push(&next, b->p.x, b->p.y);
		/* the hole from m round to m; when it touches, m is the
		 * bridge point itself and is not repeated */
		for (size_t k = touching ? 1 : 0;
		     k < (touching ? hole->count : hole->count + 1); k++) {
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

/* A hole that touches the merged ring at one of its vertices (valid for
 * OGC and GEOS) joins there with no cut-in at all: the contour then
 * passes that point twice, as a vertex both times, instead of having a
 * vertex of the hole lie inside an edge of the ring. */
static bool touching_bridge(const struct join *join,
			    const struct gp_ring *hole, size_t *mi,
			    struct bridge *out)
{
	const struct gp_ring *merged = join->merged;
	struct gp_box hb = gp_box_none();
	for (size_t k = 0; k < hole->count; k++)
		hb = gp_box_union(hb, gp_box_make(hole->points[k].x,
						  hole->points[k].y,
						  hole->points[k].x,
						  hole->points[k].y));
	for (size_t i = 0; i < merged->count; i++) {
		struct gp_point a = merged->points[i], b = ring_at(merged, i + 1);
		/* most edges are nowhere near the hole */
		if ((a.x < hb.x0 && b.x < hb.x0) || (a.x > hb.x1 && b.x > hb.x1) ||
		    (a.y < hb.y0 && b.y < hb.y0) || (a.y > hb.y1 && b.y > hb.y1))
			continue;
		for (size_t k = 0; k < hole->count; k++) {
			struct gp_point h = hole->points[k];
			if (same_point(a, h))
				*out = (struct bridge){ i, false, h };
			else if (!same_point(b, h) && orient(a, b, h) == 0 &&
				 on_segment(a, b, h))
				*out = (struct bridge){ i, true, h };
			else
				continue;
			*mi = k;
			return true;
		}
	}
	return false;
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

static bool join_all(struct join *join, const char **why)
{
	for (; join->done < join->hole_count; join->done++) {
		const struct gp_ring *hole =
			&join->holes[join->order[join->done].index];
		size_t mi = max_x_vertex(hole);
		struct bridge b;
		if (!touching_bridge(join, hole, &mi, &b) &&
		    !horizontal_bridge(join, hole, mi, &b) &&
		    !vertex_bridge(join, hole, mi, &b, why))
			return false;
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

/* May segments i < j of a contour meet as they do?  Spec 4.10.3: no
 * crossing or overlap, except fully coincident segments (cut-ins);
 * segments may share a vertex (neighbours always do) but no more. */
static bool segments_allowed(const struct gp_ring *r, size_t i, size_t j)
{
	struct gp_point a = r->points[i], b = ring_at(r, i + 1);
	struct gp_point c = r->points[j], d = ring_at(r, j + 1);
	if (!segments_touch(a, b, c, d))
		return true;
	if (same_point(a, d) && same_point(b, c))
		return true; /* a cut-in pair */
	bool shared = same_point(a, c) || same_point(a, d) ||
		      same_point(b, c) || same_point(b, d);
	if (!shared || same_point(a, b) || same_point(c, d))
		return false;
	/* sharing a vertex: the far end of either may not lie on the other */
	struct gp_point c_far = same_point(c, a) || same_point(c, b) ? d : c;
	struct gp_point a_far = same_point(a, c) || same_point(a, d) ? b : a;
	return !(orient(a, b, c_far) == 0 && on_segment(a, b, c_far)) &&
	       !(orient(c, d, a_far) == 0 && on_segment(c, d, a_far));
}

/* Checks the joined contour (a sweep over x, so nearly linear for the
 * shapes we draw): what the holes' cut-ins promise, and what a bad input
 * (holes that overlap or leave the outer ring) breaks. */
static bool contour_valid(const struct gp_ring *r, const char **why)
{
	size_t n = r->count;
	struct span *spans = malloc(n * sizeof(*spans));
	if (!spans)
		return fail(why, "out of memory");
	for (size_t i = 0; i < n; i++) {
		int64_t xa = r->points[i].x, xb = ring_at(r, i + 1).x;
		spans[i] = (struct span){ xa < xb ? xa : xb, xa < xb ? xb : xa,
					  i };
	}
	qsort(spans, n, sizeof(*spans), compare_spans);
	bool ok = true;
	for (size_t k = 0; k < n && ok; k++)
		for (size_t l = k + 1; l < n && ok && spans[l].x0 <= spans[k].x1;
		     l++) {
			size_t i = spans[k].index, j = spans[l].index;
			ok = segments_allowed(r, i < j ? i : j, i < j ? j : i);
		}
	free(spans);
	return ok ? true
		  : fail(why, "a filled shape crosses itself, or its holes "
			      "overlap or leave the outer ring");
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
	bool ok = false;
	if (!holes || !order) {
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
	}
	qsort(order, n, sizeof(*order), compare_holes);
	struct join join = { contour, holes, order, n, 0 };
	ok = join_all(&join, why) && contour_valid(contour, why);
out:
	for (size_t i = 0; holes && i < n; i++)
		gp_ring_finish(&holes[i]);
	free(holes);
	free(order);
	if (!ok)
		gp_ring_finish(contour);
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
};

struct writer {
	struct gp_buffer *out;
	const char **why;
	struct aperture *apertures;
	size_t count, capacity;
	long current; /* D code selected, 0 for none */
};

/* Placeholder aperture for a file with regions only: some readers expect
 * every file to define one (10 um circle, never drawn with). */
#define PLACEHOLDER_DIAMETER INT64_C(10000)
#define FIRST_D_CODE 10 /* D10 is the first free code (section 4.3) */

static long aperture_code(struct writer *w, enum aperture_kind kind,
			  int64_t a, int64_t b, bool add)
{
	for (size_t i = 0; i < w->count; i++)
		if (w->apertures[i].kind == kind && w->apertures[i].a == a &&
		    w->apertures[i].b == b)
			return FIRST_D_CODE + (long)i;
	if (!add)
		return 0;
	if (w->count == w->capacity) {
		size_t capacity = w->capacity ? w->capacity * 2 : 8;
		struct aperture *grown =
			realloc(w->apertures, capacity * sizeof(*grown));
		if (!grown)
			return 0;
		w->apertures = grown;
		w->capacity = capacity;
	}
	w->apertures[w->count] = (struct aperture){ kind, a, b };
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

static bool collect_apertures(struct writer *w, const struct gp_artwork *art,
			      enum gp_layer layer)
{
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		struct gp_box box;
		long code = 1;
		if (s->layer != layer)
			continue;
		if (s->line_width > 0)
			code = aperture_code(w, APERTURE_CIRCLE, s->line_width,
					     0, true);
		else if (flashable_pad(s, &box))
			code = aperture_code(w, APERTURE_RECTANGLE,
					     gp_box_width(box),
					     gp_box_height(box), true);
		if (code == 0)
			return fail(w->why, "out of memory");
	}
	if (w->count == 0 &&
	    !aperture_code(w, APERTURE_CIRCLE, PLACEHOLDER_DIAMETER, 0, true))
		return fail(w->why, "out of memory");
	return true;
}

/* Attribute and comment text, escaped as a Gerber string (section 3.4.3;
 * escape.h). */
static void put_text(struct gp_buffer *out, const char *text)
{
	gp_escape_gerber(out, text);
}

static void write_header(struct writer *w, enum gp_layer layer,
			 const struct gp_gerber_info *info)
{
	struct gp_buffer *out = w->out;
	const char *part = info && info->part_number ? info->part_number : NULL;
	gp_buffer_puts(out, "G04 ");
	put_text(out, gp_layer_title(layer));
	if (part) {
		gp_buffer_puts(out, " of glass ");
		put_text(out, part);
	}
	gp_buffer_puts(out, "*\n");
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
	gp_buffer_puts(out, "%TF.FileFunction,Other,");
	put_text(out, gp_layer_name(layer));
	gp_buffer_puts(out, "*%\n%TF.FilePolarity,Positive*%\n");
	gp_buffer_puts(out, "%TF.Part,Single*%\n");
	gp_buffer_puts(out, "%TF.SameCoordinates");
	if (part) {
		gp_buffer_puts(out, ",");
		put_text(out, part);
	}
	gp_buffer_puts(out, "*%\n%LPD*%\nG01*\n");
	for (size_t i = 0; i < w->count; i++) {
		const struct aperture *a = &w->apertures[i];
		char sa[40], sb[40];
		gp_format_mm(sa, sizeof(sa), a->a);
		gp_format_mm(sb, sizeof(sb), a->b);
		if (a->kind == APERTURE_CIRCLE)
			gp_buffer_printf(out, "%%ADD%dC,%s*%%\n",
					 FIRST_D_CODE + (int)i, sa);
		else
			gp_buffer_printf(out, "%%ADD%dR,%sX%s*%%\n",
					 FIRST_D_CODE + (int)i, sa, sb);
	}
}

static bool put_point(struct writer *w, struct gp_point p, int operation)
{
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
	select_aperture(w, aperture_code(w, APERTURE_CIRCLE, s->line_width, 0,
					 false));
	struct gp_point first = r->points[0], last = first;
	size_t drawn = 0;
	put_point(w, first, 2);
	for (size_t i = 1; i <= r->count; i++) {
		if (i == r->count && s->open_path)
			break;
		struct gp_point p = i == r->count ? first : r->points[i];
		if (same_point(p, last))
			continue; /* no zero-length draws */
		put_point(w, p, 1);
		last = p;
		drawn++;
	}
	if (drawn == 0) /* a single point: a dot */
		put_point(w, first, 3);
	return true;
}

static bool write_region(struct writer *w, const struct gp_shape *s)
{
	struct gp_ring contour;
	if (!gp_gerber_join_holes(&contour, &s->poly, w->why))
		return false;
	bool ok = ring_in_range(&contour, GP_GERBER_COORD_MAX);
	/* one contour, closed exactly on its first point (section 4.10) */
	gp_buffer_puts(w->out, "G36*\n");
	for (size_t i = 0; ok && i <= contour.count; i++)
		ok = put_point(w, ring_at(&contour, i), i == 0 ? 2 : 1);
	gp_buffer_puts(w->out, "G37*\n");
	if (!ok)
		fail(w->why, "a coordinate is beyond 9999.999999 mm, the "
			     "range of Gerber format 4.6");
	gp_ring_finish(&contour);
	return ok;
}

static bool write_flash(struct writer *w, struct gp_box box)
{
	select_aperture(w, aperture_code(w, APERTURE_RECTANGLE,
					 gp_box_width(box), gp_box_height(box),
					 false));
	struct gp_point centre = { (box.x0 + box.x1) / 2,
				   (box.y0 + box.y1) / 2 };
	return put_point(w, centre, 3);
}

static bool write_shapes(struct writer *w, const struct gp_artwork *art,
			 enum gp_layer layer)
{
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		struct gp_box box;
		bool ok;
		if (s->layer != layer)
			continue;
		if (s->line_width > 0)
			ok = write_stroke(w, s);
		else if (flashable_pad(s, &box))
			ok = write_flash(w, box);
		else
			ok = write_region(w, s);
		if (!ok)
			return false;
	}
	return true;
}

bool gp_gerber_write_why(struct gp_buffer *out, const struct gp_artwork *art,
			 enum gp_layer layer,
			 const struct gp_gerber_info *info, const char **why)
{
	struct writer w = { .out = out, .why = why };
	bool ok = collect_apertures(&w, art, layer);
	if (ok) {
		write_header(&w, layer, info);
		ok = write_shapes(&w, art, layer);
	}
	if (ok) {
		gp_buffer_puts(out, "M02*\n"); /* section 4.13 */
		if (out->failed)
			ok = fail(why, "out of memory");
	}
	free(w.apertures);
	return ok;
}

bool gp_gerber_write(struct gp_buffer *out, const struct gp_artwork *art,
		     enum gp_layer layer, const struct gp_gerber_info *info)
{
	return gp_gerber_write_why(out, art, layer, info, NULL);
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
