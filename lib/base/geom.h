/* Integer geometry.  Coordinates are int64_t nanometres, x to the right,
 * y up, in the glass frame (the description's origin).  A ring is closed
 * implicitly: the last point is not a repeat of the first.  Outer rings run
 * counter-clockwise, holes clockwise (gp_polygon_normalize makes it so). */
#ifndef GP_GEOM_H
#define GP_GEOM_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

struct gp_point {
	int64_t x, y;
};

/* Half-open in nothing: a box covers [x0, x1] x [y0, y1], x0 <= x1. */
struct gp_box {
	int64_t x0, y0, x1, y1;
};

struct gp_ring {
	struct gp_point *points;
	size_t count;
	size_t capacity;
};

struct gp_polygon {
	struct gp_ring outer;
	struct gp_ring *holes;
	size_t hole_count;
};

/* A set of polygons (a multipolygon); polygons do not overlap when it
 * comes from GEOS, but hand-built sets may. */
struct gp_polyset {
	struct gp_polygon *items;
	size_t count;
	size_t capacity;
};

void gp_ring_init(struct gp_ring *ring);
void gp_ring_finish(struct gp_ring *ring);
bool gp_ring_push(struct gp_ring *ring, int64_t x, int64_t y);
/* Twice the signed area in nm^2 as double (positive counter-clockwise). */
double gp_ring_area2(const struct gp_ring *ring);
void gp_ring_reverse(struct gp_ring *ring);
bool gp_ring_copy(struct gp_ring *dst, const struct gp_ring *src);
/* Drop repeated points (and a closing repeat), so no segment has zero length. */
void gp_ring_clean(struct gp_ring *ring);

void gp_polygon_init(struct gp_polygon *poly);
void gp_polygon_finish(struct gp_polygon *poly);
bool gp_polygon_copy(struct gp_polygon *dst, const struct gp_polygon *src);
/* Take over a ring as a new hole (the ring is moved, left empty). */
bool gp_polygon_add_hole(struct gp_polygon *poly, struct gp_ring *hole);
bool gp_polygon_set_box(struct gp_polygon *poly, struct gp_box box);
/* Area in mm^2 (outer minus holes). */
double gp_polygon_area_mm2(const struct gp_polygon *poly);
struct gp_box gp_polygon_bounds(const struct gp_polygon *poly);
/* Outer ring counter-clockwise, holes clockwise. */
void gp_polygon_normalize(struct gp_polygon *poly);
void gp_polygon_translate(struct gp_polygon *poly, int64_t dx, int64_t dy);

void gp_polyset_init(struct gp_polyset *set);
void gp_polyset_finish(struct gp_polyset *set);
/* Move poly into the set (poly is left empty). */
bool gp_polyset_take(struct gp_polyset *set, struct gp_polygon *poly);
double gp_polyset_area_mm2(const struct gp_polyset *set);

struct gp_box gp_box_make(int64_t x0, int64_t y0, int64_t x1, int64_t y1);
struct gp_box gp_box_union(struct gp_box a, struct gp_box b);
bool gp_box_is_empty(struct gp_box box);
static inline int64_t gp_box_width(struct gp_box b) { return b.x1 - b.x0; }
static inline int64_t gp_box_height(struct gp_box b) { return b.y1 - b.y0; }
/* An empty box for unions: x0 > x1. */
struct gp_box gp_box_none(void);
/* Centre, rounded toward x0 and y0. */
struct gp_point gp_box_centre(struct gp_box b);
/* The common part of a and b; empty (x0 > x1 or y0 > y1) when they are
 * apart. */
struct gp_box gp_box_meet(struct gp_box a, struct gp_box b);
/* Wider than a line and taller than a point: x0 < x1 and y0 < y1. */
bool gp_box_has_area(struct gp_box b);
/* inner lies within outer (edges may coincide). */
bool gp_box_inside(struct gp_box inner, struct gp_box outer);
/* The box grown by d on every side (shrunk for d < 0, through
 * gp_box_make, so the corners stay ordered). */
struct gp_box gp_box_grow(struct gp_box b, int64_t d);
/* Area in mm^2; 0 for a box without area. */
double gp_box_mm2(struct gp_box b);
/* Their insides overlap: sharing only an edge is not enough. */
bool gp_box_overlap(struct gp_box a, struct gp_box b);
/* They overlap or touch (share an edge or a corner). */
bool gp_box_touch(struct gp_box a, struct gp_box b);

#endif
