/* The bridge to GEOS: the only module that calls GEOS (reentrant _r API,
 * GEOS_USE_ONLY_R_API).
 *
 * Units and conventions:
 * - Coordinates are int64_t nanometres as everywhere (lib/geom.h); inside
 *   GEOS they are doubles holding the same nanometre values (exact up to
 *   2^53 nm, far beyond GP_LENGTH_MAX).
 * - Results handed back as struct gp_polyset are snapped to the 1 nm grid
 *   with GEOS's snap-rounding precision reducer, so they stay valid after
 *   snapping.  Their outer rings run counter-clockwise and holes clockwise,
 *   polygons of one set do not overlap.
 * - Areas are in mm^2, distances in nm (as double, not rounded).
 * - Round joins are flattened with a chord tolerance: the largest distance
 *   between an arc and its chords.  GEOS puts the vertices on the arc, so a
 *   round offset lies inside the true offset by at most that tolerance.
 *
 * Errors: every GEOS error and notice is recorded in the struct gp_diag
 * given at creation ("GEOS: ..."); functions return false or NULL. */
#ifndef GP_GEOS_H
#define GP_GEOS_H

#include "diag.h"
#include "geom.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

/* Owns one GEOS context handle.  Not shared between threads. */
struct gp_geos;

/* diag is borrowed and must outlive the object (or be replaced with
 * gp_geos_set_diag).  Returns NULL when out of memory. */
struct gp_geos *gp_geos_create(struct gp_diag *diag);
void gp_geos_destroy(struct gp_geos *geos);
void gp_geos_set_diag(struct gp_geos *geos, struct gp_diag *diag);

/* How an offset treats convex corners. */
enum gp_join {
	GP_JOIN_ROUND, /* circular arcs, flattened with the chord tolerance */
	GP_JOIN_MITRE, /* straight extension of both edges (mitre limit 10,
			* beyond it the corner is bevelled) */
};

/* How overlapping or self-crossing rings fill (as in PostScript/FreeType:
 * FreeType outlines use nonzero unless FT_OUTLINE_EVEN_ODD_FILL is set). */
enum gp_fill_rule {
	GP_FILL_EVEN_ODD, /* inside where a ray crosses an odd number of edges */
	GP_FILL_NONZERO,  /* inside where the winding number is not zero */
};

/* --- shapes kept inside GEOS ------------------------------------------- */

/* A geometry held in GEOS coordinates (nm), with its bounds and, once a
 * predicate has been asked, its prepared form.  Owned by the caller;
 * destroy with gp_geos_shape_destroy before the struct gp_geos. */
struct gp_geos_shape;

struct gp_geos_shape *gp_geos_shape_from_polygon(struct gp_geos *geos,
						 const struct gp_polygon *poly);
struct gp_geos_shape *gp_geos_shape_from_polyset(struct gp_geos *geos,
						 const struct gp_polyset *set);
struct gp_geos_shape *gp_geos_shape_from_box(struct gp_geos *geos,
					     struct gp_box box);
void gp_geos_shape_destroy(struct gp_geos *geos, struct gp_geos_shape *shape);
struct gp_geos_shape *gp_geos_shape_clone(struct gp_geos *geos,
					  const struct gp_geos_shape *shape);
/* Copy moved by (dx, dy) nm. */
struct gp_geos_shape *gp_geos_shape_translate(struct gp_geos *geos,
					      const struct gp_geos_shape *shape,
					      int64_t dx, int64_t dy);
/* Bounds in nm (rounded outwards); gp_box_none() when empty. */
struct gp_box gp_geos_shape_bounds(const struct gp_geos_shape *shape);
bool gp_geos_shape_is_empty(struct gp_geos *geos,
			    const struct gp_geos_shape *shape);
/* Area in mm^2 of the polygonal parts, computed by GEOS without snapping. */
double gp_geos_shape_area_mm2(struct gp_geos *geos,
			      const struct gp_geos_shape *shape);
/* Polygonal parts, snapped to 1 nm, appended to out (which the caller has
 * initialised). */
bool gp_geos_shape_to_polyset(struct gp_geos *geos,
			      const struct gp_geos_shape *shape,
			      struct gp_polyset *out);

/* Operations on shapes; results are new shapes, not snapped (areas of
 * results are therefore exact to double precision).  NULL on error. */
struct gp_geos_shape *gp_geos_shape_union(struct gp_geos *geos,
					  struct gp_geos_shape *const *shapes,
					  size_t count);
struct gp_geos_shape *gp_geos_shape_intersection(
	struct gp_geos *geos, const struct gp_geos_shape *a,
	const struct gp_geos_shape *b);
struct gp_geos_shape *gp_geos_shape_difference(struct gp_geos *geos,
					       const struct gp_geos_shape *a,
					       const struct gp_geos_shape *b);
/* Offset by distance nm: positive dilates, negative erodes. */
struct gp_geos_shape *gp_geos_shape_offset(struct gp_geos *geos,
					   const struct gp_geos_shape *shape,
					   int64_t distance, enum gp_join join,
					   int64_t chord_tolerance);
/* Minkowski sum with the rectangle [-mx, mx] x [-my, my]: every point that
 * some shift (dx, dy) with |dx| <= mx, |dy| <= my brings into the shape.
 * This is what survives plate misalignment of up to mx, my; unlike a round
 * or mitred offset it covers the diagonal shifts too.  Exact (no arcs). */
struct gp_geos_shape *gp_geos_shape_dilate_box(
	struct gp_geos *geos, const struct gp_geos_shape *shape, int64_t mx,
	int64_t my);

/* Predicates.  The first shape is prepared on first use and kept prepared,
 * so ask with the shape that is tested many times first.  Return false and
 * record an error when GEOS fails (*error set when error is not NULL). */
bool gp_geos_shape_intersects(struct gp_geos *geos, struct gp_geos_shape *a,
			      const struct gp_geos_shape *b);
/* Boundaries meet but interiors do not. */
bool gp_geos_shape_touches(struct gp_geos *geos, struct gp_geos_shape *a,
			   const struct gp_geos_shape *b);
/* Interiors overlap (intersects and not touches). */
bool gp_geos_shape_overlaps_area(struct gp_geos *geos,
				 struct gp_geos_shape *a,
				 const struct gp_geos_shape *b);
bool gp_geos_shape_covers(struct gp_geos *geos, struct gp_geos_shape *a,
			  const struct gp_geos_shape *b);
/* Least distance in nm (0 when they meet); false on error. */
bool gp_geos_shape_distance(struct gp_geos *geos, struct gp_geos_shape *a,
			    const struct gp_geos_shape *b, double *distance);

/* The nearest points of a and b in nm (rounded); a is prepared.  Both
 * must be non-empty. */
bool gp_geos_shape_nearest(struct gp_geos *geos, struct gp_geos_shape *a,
			   const struct gp_geos_shape *b, struct gp_point *pa,
			   struct gp_point *pb);

/* --- the same operations on plain polygons ------------------------------ */
/* Each appends its snapped result to out (initialised by the caller) and
 * returns false on error, leaving out as it was. */

/* Union of many polygons (GEOSUnaryUnion); they may overlap. */
bool gp_geos_union(struct gp_geos *geos, const struct gp_polygon *polys,
		   size_t count, struct gp_polyset *out);
bool gp_geos_union_set(struct gp_geos *geos, const struct gp_polyset *set,
		       struct gp_polyset *out);
bool gp_geos_intersection(struct gp_geos *geos, const struct gp_polyset *a,
			  const struct gp_polyset *b, struct gp_polyset *out);
/* a minus b */
bool gp_geos_difference(struct gp_geos *geos, const struct gp_polyset *a,
			const struct gp_polyset *b, struct gp_polyset *out);
/* distance > 0 dilates, < 0 erodes; see enum gp_join. */
bool gp_geos_offset(struct gp_geos *geos, const struct gp_polyset *set,
		    int64_t distance, enum gp_join join,
		    int64_t chord_tolerance, struct gp_polyset *out);
bool gp_geos_dilate_box(struct gp_geos *geos, const struct gp_polyset *set,
			int64_t mx, int64_t my, struct gp_polyset *out);
/* Valid polygons with holes from rings in any orientation, which may cross
 * themselves and each other, filled with rule.  Degenerate rings (fewer
 * than three distinct points, no area) add nothing. */
bool gp_geos_make_valid(struct gp_geos *geos, const struct gp_ring *rings,
			size_t count, enum gp_fill_rule rule,
			struct gp_polyset *out);
/* Area in mm^2 as GEOS computes it (overlaps inside the set count once). */
bool gp_geos_area_mm2(struct gp_geos *geos, const struct gp_polyset *set,
		      double *area);
bool gp_geos_distance(struct gp_geos *geos, const struct gp_polyset *a,
		      const struct gp_polyset *b, double *distance);

/* Segments per quarter circle that keep the chord error of an arc of
 * radius r within tolerance (both nm); at least 1, at most 4096. */
int gp_geos_quadrant_segments(int64_t radius, int64_t tolerance);

/* --- spatial index ------------------------------------------------------ */
/* A GEOS STRtree of boxes, each stored with a caller's index (never a
 * pointer, so the caller's arrays may move).  Add everything first: the
 * first query builds the tree and later adds fail. */
struct gp_geos_index;

struct gp_geos_index *gp_geos_index_create(struct gp_geos *geos);
void gp_geos_index_destroy(struct gp_geos_index *index);
bool gp_geos_index_add(struct gp_geos_index *index, struct gp_box box,
		       size_t item);
/* Calls visit for every item whose box meets box (edges included), in an
 * unspecified order.  Returns false on error. */
bool gp_geos_index_query(struct gp_geos_index *index, struct gp_box box,
			 void (*visit)(void *user, size_t item), void *user);

struct gp_index_pair {
	size_t a, b; /* a < b */
};

/* Every pair (i, j), i < j, of boxes whose gaps in x and in y are both at
 * most gap nm (a superset of the pairs closer than gap; edges touching
 * count), sorted by (a, b).  *pairs is
 * allocated (free() it); *count set.  Uses the STRtree, not all pairs. */
bool gp_geos_box_pairs(struct gp_geos *geos, const struct gp_box *boxes,
		       size_t count, int64_t gap, struct gp_index_pair **pairs,
		       size_t *pair_count);

#endif
