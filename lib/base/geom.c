#include "geom.h"

#include "array.h"
#include "units.h"

#include <stdlib.h>
#include <string.h>

void gp_ring_init(struct gp_ring *ring)
{
	memset(ring, 0, sizeof(*ring));
}

void gp_ring_finish(struct gp_ring *ring)
{
	free(ring->points);
	gp_ring_init(ring);
}

bool gp_ring_push(struct gp_ring *ring, int64_t x, int64_t y)
{
	if (!gp_array_reserve(ring->points, ring->capacity, ring->count + 1))
		return false;
	ring->points[ring->count++] = (struct gp_point){ x, y };
	return true;
}

double gp_ring_area2(const struct gp_ring *ring)
{
	double sum = 0;
	for (size_t i = 0; i < ring->count; i++) {
		const struct gp_point *p = &ring->points[i];
		const struct gp_point *q = &ring->points[(i + 1) % ring->count];
		/* subtract the first point to keep the products small */
		double px = (double)(p->x - ring->points[0].x);
		double py = (double)(p->y - ring->points[0].y);
		double qx = (double)(q->x - ring->points[0].x);
		double qy = (double)(q->y - ring->points[0].y);
		sum += px * qy - qx * py;
	}
	return sum;
}

void gp_ring_reverse(struct gp_ring *ring)
{
	for (size_t i = 0, j = ring->count; i + 1 < j; i++, j--) {
		struct gp_point t = ring->points[i];
		ring->points[i] = ring->points[j - 1];
		ring->points[j - 1] = t;
	}
}

bool gp_ring_copy(struct gp_ring *dst, const struct gp_ring *src)
{
	gp_ring_init(dst);
	if (src->count == 0)
		return true;
	dst->points = malloc(src->count * sizeof(*dst->points));
	if (!dst->points)
		return false;
	memcpy(dst->points, src->points, src->count * sizeof(*dst->points));
	dst->count = dst->capacity = src->count;
	return true;
}

void gp_ring_clean(struct gp_ring *ring)
{
	size_t out = 0;
	for (size_t i = 0; i < ring->count; i++) {
		if (out > 0 && ring->points[out - 1].x == ring->points[i].x &&
		    ring->points[out - 1].y == ring->points[i].y)
			continue;
		ring->points[out++] = ring->points[i];
	}
	while (out > 1 && ring->points[out - 1].x == ring->points[0].x &&
	       ring->points[out - 1].y == ring->points[0].y)
		out--;
	ring->count = out;
}

void gp_polygon_init(struct gp_polygon *poly)
{
	memset(poly, 0, sizeof(*poly));
}

void gp_polygon_finish(struct gp_polygon *poly)
{
	gp_ring_finish(&poly->outer);
	for (size_t i = 0; i < poly->hole_count; i++)
		gp_ring_finish(&poly->holes[i]);
	free(poly->holes);
	gp_polygon_init(poly);
}

bool gp_polygon_copy(struct gp_polygon *dst, const struct gp_polygon *src)
{
	gp_polygon_init(dst);
	if (!gp_ring_copy(&dst->outer, &src->outer))
		return false;
	for (size_t i = 0; i < src->hole_count; i++) {
		struct gp_ring hole;
		if (!gp_ring_copy(&hole, &src->holes[i]) ||
		    !gp_polygon_add_hole(dst, &hole)) {
			gp_ring_finish(&hole);
			gp_polygon_finish(dst);
			return false;
		}
	}
	return true;
}

bool gp_polygon_add_hole(struct gp_polygon *poly, struct gp_ring *hole)
{
	struct gp_ring *holes =
		realloc(poly->holes, (poly->hole_count + 1) * sizeof(*holes));
	if (!holes)
		return false;
	poly->holes = holes;
	poly->holes[poly->hole_count++] = *hole;
	gp_ring_init(hole);
	return true;
}

bool gp_polygon_set_box(struct gp_polygon *poly, struct gp_box box)
{
	gp_polygon_finish(poly);
	if (!gp_ring_push(&poly->outer, box.x0, box.y0) ||
	    !gp_ring_push(&poly->outer, box.x1, box.y0) ||
	    !gp_ring_push(&poly->outer, box.x1, box.y1) ||
	    !gp_ring_push(&poly->outer, box.x0, box.y1)) {
		gp_polygon_finish(poly);
		return false;
	}
	return true;
}

static double ring_area_mm2(const struct gp_ring *ring)
{
	double a2 = gp_ring_area2(ring);
	return (a2 < 0 ? -a2 : a2) / 2e12;
}

double gp_polygon_area_mm2(const struct gp_polygon *poly)
{
	double area = ring_area_mm2(&poly->outer);
	for (size_t i = 0; i < poly->hole_count; i++)
		area -= ring_area_mm2(&poly->holes[i]);
	return area;
}

struct gp_box gp_polygon_bounds(const struct gp_polygon *poly)
{
	struct gp_box box = gp_box_none();
	for (size_t i = 0; i < poly->outer.count; i++) {
		struct gp_point p = poly->outer.points[i];
		box = gp_box_union(box, gp_box_make(p.x, p.y, p.x, p.y));
	}
	return box;
}

void gp_polygon_normalize(struct gp_polygon *poly)
{
	if (gp_ring_area2(&poly->outer) < 0)
		gp_ring_reverse(&poly->outer);
	for (size_t i = 0; i < poly->hole_count; i++)
		if (gp_ring_area2(&poly->holes[i]) > 0)
			gp_ring_reverse(&poly->holes[i]);
}

static void ring_translate(struct gp_ring *ring, int64_t dx, int64_t dy)
{
	for (size_t i = 0; i < ring->count; i++) {
		ring->points[i].x += dx;
		ring->points[i].y += dy;
	}
}

void gp_polygon_translate(struct gp_polygon *poly, int64_t dx, int64_t dy)
{
	ring_translate(&poly->outer, dx, dy);
	for (size_t i = 0; i < poly->hole_count; i++)
		ring_translate(&poly->holes[i], dx, dy);
}

void gp_polyset_init(struct gp_polyset *set)
{
	memset(set, 0, sizeof(*set));
}

void gp_polyset_finish(struct gp_polyset *set)
{
	for (size_t i = 0; i < set->count; i++)
		gp_polygon_finish(&set->items[i]);
	free(set->items);
	gp_polyset_init(set);
}

bool gp_polyset_take(struct gp_polyset *set, struct gp_polygon *poly)
{
	if (!gp_array_reserve(set->items, set->capacity, set->count + 1))
		return false;
	set->items[set->count++] = *poly;
	gp_polygon_init(poly);
	return true;
}

double gp_polyset_area_mm2(const struct gp_polyset *set)
{
	double area = 0;
	for (size_t i = 0; i < set->count; i++)
		area += gp_polygon_area_mm2(&set->items[i]);
	return area;
}

struct gp_box gp_box_make(int64_t x0, int64_t y0, int64_t x1, int64_t y1)
{
	struct gp_box box = {
		x0 < x1 ? x0 : x1, y0 < y1 ? y0 : y1,
		x0 < x1 ? x1 : x0, y0 < y1 ? y1 : y0,
	};
	return box;
}

struct gp_box gp_box_none(void)
{
	return (struct gp_box){ INT64_MAX, INT64_MAX, INT64_MIN, INT64_MIN };
}

bool gp_box_is_empty(struct gp_box box)
{
	return box.x0 > box.x1 || box.y0 > box.y1;
}

struct gp_point gp_box_centre(struct gp_box b)
{
	return (struct gp_point){ b.x0 + (b.x1 - b.x0) / 2,
				  b.y0 + (b.y1 - b.y0) / 2 };
}

struct gp_box gp_box_meet(struct gp_box a, struct gp_box b)
{
	return (struct gp_box){ a.x0 > b.x0 ? a.x0 : b.x0,
				a.y0 > b.y0 ? a.y0 : b.y0,
				a.x1 < b.x1 ? a.x1 : b.x1,
				a.y1 < b.y1 ? a.y1 : b.y1 };
}

bool gp_box_has_area(struct gp_box b)
{
	return b.x0 < b.x1 && b.y0 < b.y1;
}

bool gp_box_inside(struct gp_box inner, struct gp_box outer)
{
	return inner.x0 >= outer.x0 && inner.x1 <= outer.x1 &&
	       inner.y0 >= outer.y0 && inner.y1 <= outer.y1;
}

struct gp_box gp_box_grow(struct gp_box b, int64_t d)
{
	return gp_box_make(b.x0 - d, b.y0 - d, b.x1 + d, b.y1 + d);
}

double gp_box_mm2(struct gp_box b)
{
	return gp_box_has_area(b) ? gp_mm(b.x1 - b.x0) * gp_mm(b.y1 - b.y0) : 0;
}

bool gp_box_overlap(struct gp_box a, struct gp_box b)
{
	return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1;
}

bool gp_box_touch(struct gp_box a, struct gp_box b)
{
	return a.x0 <= b.x1 && b.x0 <= a.x1 && a.y0 <= b.y1 && b.y0 <= a.y1;
}

struct gp_box gp_box_union(struct gp_box a, struct gp_box b)
{
	if (gp_box_is_empty(a))
		return b;
	if (gp_box_is_empty(b))
		return a;
	return (struct gp_box){
		a.x0 < b.x0 ? a.x0 : b.x0, a.y0 < b.y0 ? a.y0 : b.y0,
		a.x1 > b.x1 ? a.x1 : b.x1, a.y1 > b.y1 ? a.y1 : b.y1,
	};
}
