#include "geos.h"

#include "array.h"

#include <geos_c.h>

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

/* GEOS mitre limit: a corner sharper than this ratio of offset is
 * bevelled (GEOS default is 5; 10 keeps corners down to ~11.5 degrees). */
#define MITRE_LIMIT 10.0

#define PI 3.14159265358979323846

struct gp_geos {
	GEOSContextHandle_t ctx;
	struct gp_diag *diag;
};

struct gp_geos_shape {
	GEOSGeometry *g;
	const GEOSPreparedGeometry *prepared; /* made on first predicate */
	struct gp_box bounds;
};

/* --- context and messages ----------------------------------------------- */

static void on_error(const char *message, void *user)
{
	struct gp_geos *geos = user;
	if (geos->diag)
		gp_diag_fail(geos->diag, GP_MSG_GEOMETRY_FAILED, NULL,
			     "GEOS: %s", message);
}

static void on_notice(const char *message, void *user)
{
	struct gp_geos *geos = user;
	if (geos->diag)
		gp_diag_note(geos->diag, NULL, "GEOS: %s", message);
}

struct gp_geos *gp_geos_create(struct gp_diag *diag)
{
	struct gp_geos *geos = calloc(1, sizeof(*geos));
	if (!geos)
		return NULL;
	geos->diag = diag;
	geos->ctx = GEOS_init_r();
	if (!geos->ctx) {
		free(geos);
		return NULL;
	}
	GEOSContext_setErrorMessageHandler_r(geos->ctx, on_error, geos);
	GEOSContext_setNoticeMessageHandler_r(geos->ctx, on_notice, geos);
	return geos;
}

void gp_geos_destroy(struct gp_geos *geos)
{
	if (!geos)
		return;
	GEOS_finish_r(geos->ctx);
	free(geos);
}

void gp_geos_set_diag(struct gp_geos *geos, struct gp_diag *diag)
{
	geos->diag = diag;
}

static bool fail(struct gp_geos *geos, const char *what)
{
	if (geos->diag)
		gp_diag_fail(geos->diag, GP_MSG_GEOMETRY_FAILED, NULL,
			     "GEOS: %s failed", what);
	return false;
}

/* --- conversion in ------------------------------------------------------- */

/* A closed GEOS ring from our implicitly closed ring. */
static GEOSGeometry *ring_in(struct gp_geos *geos, const struct gp_ring *ring)
{
	size_t n = ring->count;
	double *xy = malloc((n + 1) * 2 * sizeof(*xy));
	if (!xy)
		return NULL;
	for (size_t i = 0; i <= n; i++) {
		const struct gp_point *p = &ring->points[i % n];
		xy[2 * i] = (double)p->x;
		xy[2 * i + 1] = (double)p->y;
	}
	GEOSCoordSequence *seq =
		GEOSCoordSeq_copyFromBuffer_r(geos->ctx, xy, n + 1, 0, 0);
	free(xy);
	if (!seq)
		return NULL;
	return GEOSGeom_createLinearRing_r(geos->ctx, seq);
}

static GEOSGeometry *polygon_in(struct gp_geos *geos,
				const struct gp_polygon *poly)
{
	if (poly->outer.count < 3)
		return GEOSGeom_createEmptyPolygon_r(geos->ctx);
	GEOSGeometry *shell = ring_in(geos, &poly->outer);
	if (!shell)
		return NULL;
	GEOSGeometry **holes = NULL;
	size_t hole_count = 0;
	if (poly->hole_count) {
		holes = calloc(poly->hole_count, sizeof(*holes));
		if (!holes)
			goto fail;
	}
	for (size_t i = 0; i < poly->hole_count; i++) {
		if (poly->holes[i].count < 3)
			continue;
		holes[hole_count] = ring_in(geos, &poly->holes[i]);
		if (!holes[hole_count])
			goto fail;
		hole_count++;
	}
	/* takes ownership of shell and holes, not of the array */
	GEOSGeometry *g = GEOSGeom_createPolygon_r(geos->ctx, shell, holes,
						   (unsigned)hole_count);
	free(holes);
	return g;
fail:
	for (size_t i = 0; i < hole_count; i++)
		GEOSGeom_destroy_r(geos->ctx, holes[i]);
	free(holes);
	GEOSGeom_destroy_r(geos->ctx, shell);
	return NULL;
}

/* A collection (GEOS_GEOMETRYCOLLECTION when parts may overlap, else
 * GEOS_MULTIPOLYGON) of the polygons; takes the array's geometries. */
static GEOSGeometry *collect(struct gp_geos *geos, int type,
			     GEOSGeometry **parts, size_t count)
{
	GEOSGeometry *g = GEOSGeom_createCollection_r(geos->ctx, type, parts,
						      (unsigned)count);
	if (!g)
		for (size_t i = 0; i < count; i++)
			GEOSGeom_destroy_r(geos->ctx, parts[i]);
	return g;
}

static GEOSGeometry *polygons_in(struct gp_geos *geos,
				 const struct gp_polygon *polys, size_t count)
{
	GEOSGeometry **parts = calloc(count ? count : 1, sizeof(*parts));
	if (!parts)
		return NULL;
	size_t made = 0;
	for (; made < count; made++) {
		parts[made] = polygon_in(geos, &polys[made]);
		if (!parts[made])
			break;
	}
	GEOSGeometry *g = NULL;
	if (made == count)
		g = collect(geos, GEOS_GEOMETRYCOLLECTION, parts, count);
	else
		for (size_t i = 0; i < made; i++)
			GEOSGeom_destroy_r(geos->ctx, parts[i]);
	free(parts);
	return g;
}

/* --- conversion out ------------------------------------------------------ */

static bool ring_out(struct gp_geos *geos, const GEOSGeometry *ring,
		     struct gp_ring *out)
{
	gp_ring_init(out);
	const GEOSCoordSequence *seq = GEOSGeom_getCoordSeq_r(geos->ctx, ring);
	unsigned int n = 0;
	if (!seq || !GEOSCoordSeq_getSize_r(geos->ctx, seq, &n))
		return false;
	for (unsigned int i = 0; i < n; i++) {
		double x, y;
		if (!GEOSCoordSeq_getXY_r(geos->ctx, seq, i, &x, &y) ||
		    !gp_ring_push(out, llround(x), llround(y))) {
			gp_ring_finish(out);
			return false;
		}
	}
	gp_ring_clean(out);
	return true;
}

static bool polygon_out(struct gp_geos *geos, const GEOSGeometry *g,
			struct gp_polyset *out)
{
	struct gp_polygon poly;
	gp_polygon_init(&poly);
	const GEOSGeometry *shell = GEOSGetExteriorRing_r(geos->ctx, g);
	if (!shell || !ring_out(geos, shell, &poly.outer))
		goto fail;
	if (poly.outer.count < 3) {
		gp_polygon_finish(&poly);
		return true;
	}
	int holes = GEOSGetNumInteriorRings_r(geos->ctx, g);
	for (int i = 0; i < holes; i++) {
		struct gp_ring hole;
		const GEOSGeometry *r = GEOSGetInteriorRingN_r(geos->ctx, g, i);
		if (!r || !ring_out(geos, r, &hole))
			goto fail;
		if (hole.count < 3) {
			gp_ring_finish(&hole);
			continue;
		}
		if (!gp_polygon_add_hole(&poly, &hole)) {
			gp_ring_finish(&hole);
			goto fail;
		}
	}
	gp_polygon_normalize(&poly);
	if (!gp_polyset_take(out, &poly))
		goto fail;
	return true;
fail:
	gp_polygon_finish(&poly);
	return false;
}

/* Appends the polygons found in g (at any depth of collections). */
static bool polygons_out(struct gp_geos *geos, const GEOSGeometry *g,
			 struct gp_polyset *out)
{
	int type = GEOSGeomTypeId_r(geos->ctx, g);
	if (type == GEOS_POLYGON)
		return GEOSisEmpty_r(geos->ctx, g) == 1 ||
		       polygon_out(geos, g, out);
	if (type != GEOS_MULTIPOLYGON && type != GEOS_GEOMETRYCOLLECTION)
		return true;
	int n = GEOSGetNumGeometries_r(geos->ctx, g);
	for (int i = 0; i < n; i++)
		if (!polygons_out(geos, GEOSGetGeometryN_r(geos->ctx, g, i),
				  out))
			return false;
	return true;
}

/* Only the polygonal parts of g, as a new geometry (a clone). */
static GEOSGeometry *polygonal_part(struct gp_geos *geos, const GEOSGeometry *g)
{
	int type = GEOSGeomTypeId_r(geos->ctx, g);
	if (type == GEOS_POLYGON || type == GEOS_MULTIPOLYGON)
		return GEOSGeom_clone_r(geos->ctx, g);
	if (type != GEOS_GEOMETRYCOLLECTION)
		return GEOSGeom_createEmptyPolygon_r(geos->ctx);
	int n = GEOSGetNumGeometries_r(geos->ctx, g);
	GEOSGeometry **parts = calloc(n > 0 ? (size_t)n : 1, sizeof(*parts));
	if (!parts)
		return NULL;
	size_t count = 0;
	for (int i = 0; i < n; i++) {
		GEOSGeometry *part = polygonal_part(
			geos, GEOSGetGeometryN_r(geos->ctx, g, i));
		if (!part)
			goto fail;
		if (GEOSisEmpty_r(geos->ctx, part) == 1)
			GEOSGeom_destroy_r(geos->ctx, part);
		else
			parts[count++] = part;
	}
	GEOSGeometry *result = collect(geos, GEOS_GEOMETRYCOLLECTION, parts,
				       count);
	free(parts);
	return result;
fail:
	for (size_t i = 0; i < count; i++)
		GEOSGeom_destroy_r(geos->ctx, parts[i]);
	free(parts);
	return NULL;
}

/* Snap to the 1 nm grid with GEOS's snap-rounding reducer (keeps the
 * result valid) and append the polygons to out. */
static bool snapped_out(struct gp_geos *geos, const GEOSGeometry *g,
			struct gp_polyset *out)
{
	GEOSGeometry *poly = polygonal_part(geos, g);
	if (!poly)
		return fail(geos, "extracting polygons");
	GEOSGeometry *snapped = NULL;
	if (GEOSisEmpty_r(geos->ctx, poly) == 1)
		snapped = GEOSGeom_clone_r(geos->ctx, poly);
	else if (GEOSGeomTypeId_r(geos->ctx, poly) == GEOS_GEOMETRYCOLLECTION)
		/* union also merges the parts and snaps in one pass */
		snapped = GEOSUnaryUnionPrec_r(geos->ctx, poly, 1.0);
	else
		snapped = GEOSGeom_setPrecision_r(geos->ctx, poly, 1.0, 0);
	GEOSGeom_destroy_r(geos->ctx, poly);
	if (!snapped)
		return fail(geos, "snapping to 1 nm");
	size_t before = out->count;
	bool ok = polygons_out(geos, snapped, out);
	GEOSGeom_destroy_r(geos->ctx, snapped);
	if (!ok) {
		while (out->count > before)
			gp_polygon_finish(&out->items[--out->count]);
		return fail(geos, "reading the result");
	}
	return true;
}

/* --- shapes -------------------------------------------------------------- */

static struct gp_box envelope(struct gp_geos *geos, const GEOSGeometry *g)
{
	double x0, y0, x1, y1;
	if (GEOSisEmpty_r(geos->ctx, g) != 0 ||
	    !GEOSGeom_getXMin_r(geos->ctx, g, &x0) ||
	    !GEOSGeom_getYMin_r(geos->ctx, g, &y0) ||
	    !GEOSGeom_getXMax_r(geos->ctx, g, &x1) ||
	    !GEOSGeom_getYMax_r(geos->ctx, g, &y1))
		return gp_box_none();
	return (struct gp_box){ (int64_t)floor(x0), (int64_t)floor(y0),
				(int64_t)ceil(x1), (int64_t)ceil(y1) };
}

/* Wraps g (taken over); NULL g or no memory gives NULL. */
static struct gp_geos_shape *wrap(struct gp_geos *geos, GEOSGeometry *g,
				  const char *what)
{
	if (!g) {
		fail(geos, what);
		return NULL;
	}
	struct gp_geos_shape *shape = calloc(1, sizeof(*shape));
	if (!shape) {
		GEOSGeom_destroy_r(geos->ctx, g);
		return NULL;
	}
	shape->g = g;
	shape->bounds = envelope(geos, g);
	return shape;
}

struct gp_geos_shape *gp_geos_shape_from_polygon(struct gp_geos *geos,
						 const struct gp_polygon *poly)
{
	return wrap(geos, polygon_in(geos, poly), "making a polygon");
}

struct gp_geos_shape *gp_geos_shape_from_polyset(struct gp_geos *geos,
						 const struct gp_polyset *set)
{
	return wrap(geos, polygons_in(geos, set->items, set->count),
		    "making a polygon set");
}

struct gp_geos_shape *gp_geos_shape_from_box(struct gp_geos *geos,
					     struct gp_box box)
{
	struct gp_polygon poly;
	gp_polygon_init(&poly);
	if (!gp_polygon_set_box(&poly, box))
		return NULL;
	struct gp_geos_shape *shape = gp_geos_shape_from_polygon(geos, &poly);
	gp_polygon_finish(&poly);
	return shape;
}

void gp_geos_shape_destroy(struct gp_geos *geos, struct gp_geos_shape *shape)
{
	if (!shape)
		return;
	if (shape->prepared)
		GEOSPreparedGeom_destroy_r(geos->ctx, shape->prepared);
	GEOSGeom_destroy_r(geos->ctx, shape->g);
	free(shape);
}

struct gp_geos_shape *gp_geos_shape_clone(struct gp_geos *geos,
					  const struct gp_geos_shape *shape)
{
	return wrap(geos, GEOSGeom_clone_r(geos->ctx, shape->g), "copying");
}

struct shift {
	double dx, dy;
};

static int shift_xy(double *x, double *y, void *user)
{
	const struct shift *s = user;
	*x += s->dx;
	*y += s->dy;
	return 1;
}

struct gp_geos_shape *gp_geos_shape_translate(struct gp_geos *geos,
					      const struct gp_geos_shape *shape,
					      int64_t dx, int64_t dy)
{
	struct shift s = { (double)dx, (double)dy };
	return wrap(geos,
		    GEOSGeom_transformXY_r(geos->ctx, shape->g, shift_xy, &s),
		    "translating");
}

struct gp_box gp_geos_shape_bounds(const struct gp_geos_shape *shape)
{
	return shape->bounds;
}

bool gp_geos_shape_is_empty(struct gp_geos *geos,
			    const struct gp_geos_shape *shape)
{
	return GEOSisEmpty_r(geos->ctx, shape->g) != 0;
}

double gp_geos_shape_area_mm2(struct gp_geos *geos,
			      const struct gp_geos_shape *shape)
{
	double area = 0;
	if (!GEOSArea_r(geos->ctx, shape->g, &area)) {
		fail(geos, "area");
		return 0;
	}
	return area / 1e12;
}

bool gp_geos_shape_to_polyset(struct gp_geos *geos,
			      const struct gp_geos_shape *shape,
			      struct gp_polyset *out)
{
	return snapped_out(geos, shape->g, out);
}

struct gp_geos_shape *gp_geos_shape_union(struct gp_geos *geos,
					  struct gp_geos_shape *const *shapes,
					  size_t count)
{
	GEOSGeometry **parts = calloc(count ? count : 1, sizeof(*parts));
	if (!parts)
		return NULL;
	size_t made = 0;
	for (; made < count; made++) {
		parts[made] = GEOSGeom_clone_r(geos->ctx, shapes[made]->g);
		if (!parts[made])
			break;
	}
	GEOSGeometry *all = NULL;
	if (made == count)
		all = collect(geos, GEOS_GEOMETRYCOLLECTION, parts, count);
	else
		for (size_t i = 0; i < made; i++)
			GEOSGeom_destroy_r(geos->ctx, parts[i]);
	free(parts);
	if (!all) {
		fail(geos, "collecting for union");
		return NULL;
	}
	GEOSGeometry *u = GEOSUnaryUnion_r(geos->ctx, all);
	GEOSGeom_destroy_r(geos->ctx, all);
	return wrap(geos, u, "union");
}

struct gp_geos_shape *gp_geos_shape_intersection(
	struct gp_geos *geos, const struct gp_geos_shape *a,
	const struct gp_geos_shape *b)
{
	return wrap(geos, GEOSIntersection_r(geos->ctx, a->g, b->g),
		    "intersection");
}

struct gp_geos_shape *gp_geos_shape_difference(struct gp_geos *geos,
					       const struct gp_geos_shape *a,
					       const struct gp_geos_shape *b)
{
	return wrap(geos, GEOSDifference_r(geos->ctx, a->g, b->g),
		    "difference");
}

int gp_geos_quadrant_segments(int64_t radius, int64_t tolerance)
{
	if (radius < 0)
		radius = -radius;
	if (tolerance <= 0 || radius <= tolerance)
		return radius <= tolerance && tolerance > 0 ? 1 : 4096;
	/* A chord spanning angle t has sagitta r (1 - cos(t/2)); the largest
	 * t within tolerance is 2 acos(1 - tol/r). */
	double t = 2 * acos(1 - (double)tolerance / (double)radius);
	double n = ceil((PI / 2) / t);
	if (n < 1)
		return 1;
	return n > 4096 ? 4096 : (int)n;
}

struct gp_geos_shape *gp_geos_shape_offset(struct gp_geos *geos,
					   const struct gp_geos_shape *shape,
					   int64_t distance, enum gp_join join,
					   int64_t chord_tolerance)
{
	GEOSBufferParams *params = GEOSBufferParams_create_r(geos->ctx);
	if (!params) {
		fail(geos, "buffer parameters");
		return NULL;
	}
	int quadrant = gp_geos_quadrant_segments(distance, chord_tolerance);
	GEOSBufferParams_setEndCapStyle_r(geos->ctx, params,
					  GEOSBUF_CAP_ROUND);
	GEOSBufferParams_setJoinStyle_r(geos->ctx, params,
					join == GP_JOIN_ROUND
						? GEOSBUF_JOIN_ROUND
						: GEOSBUF_JOIN_MITRE);
	GEOSBufferParams_setMitreLimit_r(geos->ctx, params, MITRE_LIMIT);
	GEOSBufferParams_setQuadrantSegments_r(geos->ctx, params, quadrant);
	GEOSGeometry *g = GEOSBufferWithParams_r(geos->ctx, shape->g, params,
						 (double)distance);
	GEOSBufferParams_destroy_r(geos->ctx, params);
	return wrap(geos, g, "offset (buffer)");
}

/* The hexagon (convex hull) swept by segment p-q moved over the box. */
static GEOSGeometry *swept_segment(struct gp_geos *geos, double px, double py,
				   double qx, double qy, double mx, double my)
{
	double xy[16];
	static const int sx[4] = { -1, 1, 1, -1 }, sy[4] = { -1, -1, 1, 1 };
	for (int k = 0; k < 4; k++) {
		xy[4 * k] = px + sx[k] * mx;
		xy[4 * k + 1] = py + sy[k] * my;
		xy[4 * k + 2] = qx + sx[k] * mx;
		xy[4 * k + 3] = qy + sy[k] * my;
	}
	GEOSCoordSequence *seq =
		GEOSCoordSeq_copyFromBuffer_r(geos->ctx, xy, 8, 0, 0);
	if (!seq)
		return NULL;
	GEOSGeometry *points = GEOSGeom_createLineString_r(geos->ctx, seq);
	if (!points)
		return NULL;
	GEOSGeometry *hull = GEOSConvexHull_r(geos->ctx, points);
	GEOSGeom_destroy_r(geos->ctx, points);
	return hull;
}

/* Adds the swept hexagons of every edge of every ring of polygon g. */
static bool sweep_rings(struct gp_geos *geos, const GEOSGeometry *g, double mx,
			double my, GEOSGeometry ***parts, size_t *count,
			size_t *capacity)
{
	int holes = GEOSGetNumInteriorRings_r(geos->ctx, g);
	for (int r = -1; r < holes; r++) {
		const GEOSGeometry *ring =
			r < 0 ? GEOSGetExteriorRing_r(geos->ctx, g)
			      : GEOSGetInteriorRingN_r(geos->ctx, g, r);
		const GEOSCoordSequence *seq =
			ring ? GEOSGeom_getCoordSeq_r(geos->ctx, ring) : NULL;
		unsigned int n = 0;
		if (!seq || !GEOSCoordSeq_getSize_r(geos->ctx, seq, &n))
			return false;
		double px = 0, py = 0;
		for (unsigned int i = 0; i < n; i++) {
			double qx, qy;
			if (!GEOSCoordSeq_getXY_r(geos->ctx, seq, i, &qx, &qy))
				return false;
			if (i > 0) {
				if (!gp_array_reserve(*parts, *capacity,
						      *count + 1))
					return false;
				GEOSGeometry *hex = swept_segment(
					geos, px, py, qx, qy, mx, my);
				if (!hex)
					return false;
				(*parts)[(*count)++] = hex;
			}
			px = qx;
			py = qy;
		}
	}
	return true;
}

static bool sweep_polygons(struct gp_geos *geos, const GEOSGeometry *g,
			   double mx, double my, GEOSGeometry ***parts,
			   size_t *count, size_t *capacity)
{
	int type = GEOSGeomTypeId_r(geos->ctx, g);
	if (type == GEOS_POLYGON)
		return GEOSisEmpty_r(geos->ctx, g) == 1 ||
		       sweep_rings(geos, g, mx, my, parts, count, capacity);
	if (type != GEOS_MULTIPOLYGON && type != GEOS_GEOMETRYCOLLECTION)
		return true;
	int n = GEOSGetNumGeometries_r(geos->ctx, g);
	for (int i = 0; i < n; i++)
		if (!sweep_polygons(geos, GEOSGetGeometryN_r(geos->ctx, g, i),
				    mx, my, parts, count, capacity))
			return false;
	return true;
}

/* P + B = P united with every edge swept over B: a point p + b outside P
 * leaves P through some boundary point e, and p + b = e + s b with s b in
 * the (convex, centred) box B. */
struct gp_geos_shape *gp_geos_shape_dilate_box(
	struct gp_geos *geos, const struct gp_geos_shape *shape, int64_t mx,
	int64_t my)
{
	GEOSGeometry **parts = NULL;
	size_t count = 0, capacity = 0;
	GEOSGeometry *all = NULL;
	GEOSGeometry *base = polygonal_part(geos, shape->g);
	if (!base || mx < 0 || my < 0)
		goto fail;
	if (!sweep_polygons(geos, base, (double)mx, (double)my, &parts, &count,
			    &capacity))
		goto fail;
	if (!gp_array_reserve(parts, capacity, count + 1))
		goto fail;
	parts[count++] = base;
	base = NULL;
	all = collect(geos, GEOS_GEOMETRYCOLLECTION, parts, count);
	count = 0;
	free(parts);
	if (!all)
		return wrap(geos, NULL, "collecting for box dilation");
	GEOSGeometry *u = GEOSUnaryUnion_r(geos->ctx, all);
	GEOSGeom_destroy_r(geos->ctx, all);
	return wrap(geos, u, "box dilation");
fail:
	for (size_t i = 0; i < count; i++)
		GEOSGeom_destroy_r(geos->ctx, parts[i]);
	free(parts);
	if (base)
		GEOSGeom_destroy_r(geos->ctx, base);
	return wrap(geos, NULL, "box dilation");
}

/* --- predicates ---------------------------------------------------------- */

static bool prepare(struct gp_geos *geos, struct gp_geos_shape *shape)
{
	if (!shape->prepared)
		shape->prepared = GEOSPrepare_r(geos->ctx, shape->g);
	return shape->prepared || fail(geos, "preparing a geometry");
}

/* GEOS predicates answer 0, 1 or 2 (error). */
static bool answer(struct gp_geos *geos, char value, const char *what)
{
	if (value == 2)
		return fail(geos, what);
	return value == 1;
}

bool gp_geos_shape_intersects(struct gp_geos *geos, struct gp_geos_shape *a,
			      const struct gp_geos_shape *b)
{
	if (!gp_box_is_empty(a->bounds) && !gp_box_is_empty(b->bounds) &&
	    (a->bounds.x1 < b->bounds.x0 || b->bounds.x1 < a->bounds.x0 ||
	     a->bounds.y1 < b->bounds.y0 || b->bounds.y1 < a->bounds.y0))
		return false;
	return prepare(geos, a) &&
	       answer(geos, GEOSPreparedIntersects_r(geos->ctx, a->prepared,
						     b->g),
		      "intersects");
}

bool gp_geos_shape_touches(struct gp_geos *geos, struct gp_geos_shape *a,
			   const struct gp_geos_shape *b)
{
	return prepare(geos, a) &&
	       answer(geos, GEOSPreparedTouches_r(geos->ctx, a->prepared,
						  b->g),
		      "touches");
}

bool gp_geos_shape_overlaps_area(struct gp_geos *geos,
				 struct gp_geos_shape *a,
				 const struct gp_geos_shape *b)
{
	return gp_geos_shape_intersects(geos, a, b) &&
	       !gp_geos_shape_touches(geos, a, b);
}

bool gp_geos_shape_covers(struct gp_geos *geos, struct gp_geos_shape *a,
			  const struct gp_geos_shape *b)
{
	return prepare(geos, a) &&
	       answer(geos, GEOSPreparedCovers_r(geos->ctx, a->prepared, b->g),
		      "covers");
}

bool gp_geos_shape_distance(struct gp_geos *geos, struct gp_geos_shape *a,
			    const struct gp_geos_shape *b, double *distance)
{
	if (!prepare(geos, a))
		return false;
	if (!GEOSPreparedDistance_r(geos->ctx, a->prepared, b->g, distance))
		return fail(geos, "distance");
	return true;
}

bool gp_geos_shape_nearest(struct gp_geos *geos, struct gp_geos_shape *a,
			   const struct gp_geos_shape *b, struct gp_point *pa,
			   struct gp_point *pb)
{
	if (!prepare(geos, a))
		return false;
	GEOSCoordSequence *seq =
		GEOSPreparedNearestPoints_r(geos->ctx, a->prepared, b->g);
	double x0, y0, x1, y1;
	bool ok = seq && GEOSCoordSeq_getXY_r(geos->ctx, seq, 0, &x0, &y0) &&
		  GEOSCoordSeq_getXY_r(geos->ctx, seq, 1, &x1, &y1);
	if (seq)
		GEOSCoordSeq_destroy_r(geos->ctx, seq);
	if (!ok)
		return fail(geos, "nearest points");
	*pa = (struct gp_point){ llround(x0), llround(y0) };
	*pb = (struct gp_point){ llround(x1), llround(y1) };
	return true;
}

/* --- polygon-level operations ------------------------------------------- */

/* Runs op on shapes made from a and b, appends the snapped result. */
static bool finish_op(struct gp_geos *geos, struct gp_geos_shape *result,
		      struct gp_polyset *out)
{
	if (!result)
		return false;
	bool ok = gp_geos_shape_to_polyset(geos, result, out);
	gp_geos_shape_destroy(geos, result);
	return ok;
}

bool gp_geos_union(struct gp_geos *geos, const struct gp_polygon *polys,
		   size_t count, struct gp_polyset *out)
{
	GEOSGeometry *all = polygons_in(geos, polys, count);
	if (!all)
		return fail(geos, "collecting for union");
	/* union and snap in one snap-rounding pass */
	GEOSGeometry *u = GEOSUnaryUnionPrec_r(geos->ctx, all, 1.0);
	GEOSGeom_destroy_r(geos->ctx, all);
	if (!u)
		return fail(geos, "union");
	size_t before = out->count;
	bool ok = polygons_out(geos, u, out);
	GEOSGeom_destroy_r(geos->ctx, u);
	if (!ok) {
		while (out->count > before)
			gp_polygon_finish(&out->items[--out->count]);
		return fail(geos, "reading the union");
	}
	return true;
}

bool gp_geos_union_set(struct gp_geos *geos, const struct gp_polyset *set,
		       struct gp_polyset *out)
{
	return gp_geos_union(geos, set->items, set->count, out);
}

static bool binary_op(struct gp_geos *geos, const struct gp_polyset *a,
		      const struct gp_polyset *b, struct gp_polyset *out,
		      bool intersect)
{
	struct gp_geos_shape *sa = gp_geos_shape_from_polyset(geos, a);
	struct gp_geos_shape *sb = gp_geos_shape_from_polyset(geos, b);
	struct gp_geos_shape *ua = NULL, *ub = NULL, *r = NULL;
	bool ok = false;
	if (!sa || !sb)
		goto done;
	/* sets may overlap inside themselves: union them first */
	ua = gp_geos_shape_union(geos, &sa, 1);
	ub = gp_geos_shape_union(geos, &sb, 1);
	if (!ua || !ub)
		goto done;
	r = intersect ? gp_geos_shape_intersection(geos, ua, ub)
		      : gp_geos_shape_difference(geos, ua, ub);
	ok = finish_op(geos, r, out);
done:
	gp_geos_shape_destroy(geos, sa);
	gp_geos_shape_destroy(geos, sb);
	gp_geos_shape_destroy(geos, ua);
	gp_geos_shape_destroy(geos, ub);
	return ok;
}

bool gp_geos_intersection(struct gp_geos *geos, const struct gp_polyset *a,
			  const struct gp_polyset *b, struct gp_polyset *out)
{
	return binary_op(geos, a, b, out, true);
}

bool gp_geos_difference(struct gp_geos *geos, const struct gp_polyset *a,
			const struct gp_polyset *b, struct gp_polyset *out)
{
	return binary_op(geos, a, b, out, false);
}

/* Shape of the union of set (which may overlap itself). */
static struct gp_geos_shape *united(struct gp_geos *geos,
				    const struct gp_polyset *set)
{
	struct gp_geos_shape *s = gp_geos_shape_from_polyset(geos, set);
	if (!s)
		return NULL;
	struct gp_geos_shape *u = gp_geos_shape_union(geos, &s, 1);
	gp_geos_shape_destroy(geos, s);
	return u;
}

bool gp_geos_offset(struct gp_geos *geos, const struct gp_polyset *set,
		    int64_t distance, enum gp_join join,
		    int64_t chord_tolerance, struct gp_polyset *out)
{
	struct gp_geos_shape *u = united(geos, set);
	if (!u)
		return false;
	struct gp_geos_shape *r =
		gp_geos_shape_offset(geos, u, distance, join, chord_tolerance);
	gp_geos_shape_destroy(geos, u);
	return finish_op(geos, r, out);
}

bool gp_geos_dilate_box(struct gp_geos *geos, const struct gp_polyset *set,
			int64_t mx, int64_t my, struct gp_polyset *out)
{
	struct gp_geos_shape *u = united(geos, set);
	if (!u)
		return false;
	struct gp_geos_shape *r = gp_geos_shape_dilate_box(geos, u, mx, my);
	gp_geos_shape_destroy(geos, u);
	return finish_op(geos, r, out);
}

bool gp_geos_area_mm2(struct gp_geos *geos, const struct gp_polyset *set,
		      double *area)
{
	struct gp_geos_shape *u = united(geos, set);
	if (!u)
		return false;
	*area = gp_geos_shape_area_mm2(geos, u);
	gp_geos_shape_destroy(geos, u);
	return true;
}

bool gp_geos_distance(struct gp_geos *geos, const struct gp_polyset *a,
		      const struct gp_polyset *b, double *distance)
{
	struct gp_geos_shape *sa = gp_geos_shape_from_polyset(geos, a);
	struct gp_geos_shape *sb = gp_geos_shape_from_polyset(geos, b);
	bool ok = sa && sb;
	if (ok && !GEOSDistance_r(geos->ctx, sa->g, sb->g, distance))
		ok = fail(geos, "distance");
	gp_geos_shape_destroy(geos, sa);
	gp_geos_shape_destroy(geos, sb);
	return ok;
}

/* --- make-valid with a fill rule ---------------------------------------- */

/* Winding number of ring around (x, y) (Sunday's crossing rule), with
 * coordinates taken relative to the point to keep products small. */
static int winding(const struct gp_ring *ring, double x, double y)
{
	int w = 0;
	for (size_t i = 0; i < ring->count; i++) {
		const struct gp_point *p = &ring->points[i];
		const struct gp_point *q = &ring->points[(i + 1) % ring->count];
		double ax = (double)p->x - x, ay = (double)p->y - y;
		double bx = (double)q->x - x, by = (double)q->y - y;
		double cross = ax * by - bx * ay;
		if (ay <= 0) {
			if (by > 0 && cross > 0)
				w++;
		} else if (by <= 0 && cross < 0) {
			w--;
		}
	}
	return w;
}

static bool filled(const struct gp_ring *rings, size_t count,
		   enum gp_fill_rule rule, double x, double y)
{
	int w = 0;
	for (size_t i = 0; i < count; i++)
		if (rings[i].count >= 3)
			w += winding(&rings[i], x, y);
	return rule == GP_FILL_NONZERO ? w != 0 : (w & 1) != 0;
}

/* All rings as closed lines, noded against each other by a union. */
static GEOSGeometry *noded_lines(struct gp_geos *geos,
				 const struct gp_ring *rings, size_t count)
{
	GEOSGeometry **lines = calloc(count ? count : 1, sizeof(*lines));
	if (!lines)
		return NULL;
	size_t made = 0;
	for (size_t i = 0; i < count; i++) {
		if (rings[i].count < 3)
			continue;
		GEOSGeometry *ring = ring_in(geos, &rings[i]);
		if (!ring)
			goto fail;
		/* as a line: a ring crossing itself is no valid LinearRing */
		GEOSCoordSequence *seq = GEOSCoordSeq_clone_r(
			geos->ctx, GEOSGeom_getCoordSeq_r(geos->ctx, ring));
		GEOSGeom_destroy_r(geos->ctx, ring);
		lines[made] = seq ? GEOSGeom_createLineString_r(geos->ctx, seq)
				  : NULL;
		if (!lines[made])
			goto fail;
		made++;
	}
	GEOSGeometry *all = collect(geos, GEOS_MULTILINESTRING, lines, made);
	free(lines);
	if (!all)
		return NULL;
	GEOSGeometry *noded = GEOSUnaryUnion_r(geos->ctx, all);
	GEOSGeom_destroy_r(geos->ctx, all);
	return noded;
fail:
	for (size_t i = 0; i < made; i++)
		GEOSGeom_destroy_r(geos->ctx, lines[i]);
	free(lines);
	return NULL;
}

/* Every face of the arrangement of the rings is kept when an interior
 * point of it is filled under the rule; the kept faces are united. */
bool gp_geos_make_valid(struct gp_geos *geos, const struct gp_ring *rings,
			size_t count, enum gp_fill_rule rule,
			struct gp_polyset *out)
{
	GEOSGeometry *noded = noded_lines(geos, rings, count);
	GEOSGeometry *faces = NULL, *kept = NULL;
	GEOSGeometry **parts = NULL;
	size_t part_count = 0;
	bool ok = false;
	if (!noded) {
		fail(geos, "noding rings");
		goto done;
	}
	const GEOSGeometry *in[1] = { noded };
	faces = GEOSPolygonize_r(geos->ctx, in, 1);
	if (!faces) {
		fail(geos, "polygonize");
		goto done;
	}
	int n = GEOSGetNumGeometries_r(geos->ctx, faces);
	parts = calloc(n > 0 ? (size_t)n : 1, sizeof(*parts));
	if (!parts)
		goto done;
	for (int i = 0; i < n; i++) {
		const GEOSGeometry *face = GEOSGetGeometryN_r(geos->ctx, faces, i);
		GEOSGeometry *pt = GEOSPointOnSurface_r(geos->ctx, face);
		double x, y;
		if (!pt || !GEOSGeomGetX_r(geos->ctx, pt, &x) ||
		    !GEOSGeomGetY_r(geos->ctx, pt, &y)) {
			if (pt)
				GEOSGeom_destroy_r(geos->ctx, pt);
			continue; /* a face too thin for a point: no area */
		}
		GEOSGeom_destroy_r(geos->ctx, pt);
		if (!filled(rings, count, rule, x, y))
			continue;
		parts[part_count] = GEOSGeom_clone_r(geos->ctx, face);
		if (!parts[part_count])
			goto done;
		part_count++;
	}
	kept = collect(geos, GEOS_GEOMETRYCOLLECTION, parts, part_count);
	part_count = 0;
	if (!kept)
		goto done;
	ok = snapped_out(geos, kept, out);
done:
	for (size_t i = 0; i < part_count; i++)
		GEOSGeom_destroy_r(geos->ctx, parts[i]);
	free(parts);
	if (kept)
		GEOSGeom_destroy_r(geos->ctx, kept);
	if (faces)
		GEOSGeom_destroy_r(geos->ctx, faces);
	if (noded)
		GEOSGeom_destroy_r(geos->ctx, noded);
	return ok;
}

/* --- STRtree ------------------------------------------------------------- */

struct gp_geos_index {
	struct gp_geos *geos;
	GEOSSTRtree *tree;
	bool built;
};

/* A geometry whose envelope is box (the tree keeps envelopes by value). */
static GEOSGeometry *box_line(struct gp_geos *geos, struct gp_box box)
{
	double xy[4] = { (double)box.x0, (double)box.y0, (double)box.x1,
			 (double)box.y1 };
	GEOSCoordSequence *seq =
		GEOSCoordSeq_copyFromBuffer_r(geos->ctx, xy, 2, 0, 0);
	return seq ? GEOSGeom_createLineString_r(geos->ctx, seq) : NULL;
}

struct gp_geos_index *gp_geos_index_create(struct gp_geos *geos)
{
	struct gp_geos_index *index = calloc(1, sizeof(*index));
	if (!index)
		return NULL;
	index->geos = geos;
	index->tree = GEOSSTRtree_create_r(geos->ctx, 10);
	if (!index->tree) {
		free(index);
		return NULL;
	}
	return index;
}

void gp_geos_index_destroy(struct gp_geos_index *index)
{
	if (!index)
		return;
	GEOSSTRtree_destroy_r(index->geos->ctx, index->tree);
	free(index);
}

bool gp_geos_index_add(struct gp_geos_index *index, struct gp_box box,
		       size_t item)
{
	if (index->built || gp_box_is_empty(box))
		return index->built ? fail(index->geos, "adding to a queried "
							"index")
				    : true;
	GEOSGeometry *g = box_line(index->geos, box);
	if (!g)
		return fail(index->geos, "index box");
	/* the item is the index itself, never a pointer */
	GEOSSTRtree_insert_r(index->geos->ctx, index->tree, g,
			     (void *)(uintptr_t)item);
	GEOSGeom_destroy_r(index->geos->ctx, g);
	return true;
}

struct visit {
	void (*visit)(void *user, size_t item);
	void *user;
};

static void on_item(void *item, void *user)
{
	struct visit *v = user;
	v->visit(v->user, (size_t)(uintptr_t)item);
}

bool gp_geos_index_query(struct gp_geos_index *index, struct gp_box box,
			 void (*visit)(void *user, size_t item), void *user)
{
	GEOSGeometry *g = box_line(index->geos, box);
	if (!g)
		return fail(index->geos, "query box");
	struct visit v = { visit, user };
	index->built = true;
	GEOSSTRtree_query_r(index->geos->ctx, index->tree, g, on_item, &v);
	GEOSGeom_destroy_r(index->geos->ctx, g);
	return true;
}

struct pair_list {
	struct gp_index_pair *items;
	size_t count, capacity;
	size_t current;
	bool failed;
};

static void on_pair(void *user, size_t item)
{
	struct pair_list *list = user;
	if (item <= list->current || list->failed)
		return;
	if (!gp_array_reserve(list->items, list->capacity, list->count + 1)) {
		list->failed = true;
		return;
	}
	list->items[list->count++] =
		(struct gp_index_pair){ list->current, item };
}

static int compare_pairs(const void *pa, const void *pb)
{
	const struct gp_index_pair *a = pa, *b = pb;
	if (a->a != b->a)
		return a->a < b->a ? -1 : 1;
	return a->b < b->b ? -1 : a->b > b->b;
}

bool gp_geos_box_pairs(struct gp_geos *geos, const struct gp_box *boxes,
		       size_t count, int64_t gap, struct gp_index_pair **pairs,
		       size_t *pair_count)
{
	struct pair_list list = { 0 };
	struct gp_geos_index *index = gp_geos_index_create(geos);
	bool ok = index != NULL;
	for (size_t i = 0; ok && i < count; i++)
		ok = gp_geos_index_add(index, boxes[i], i);
	for (size_t i = 0; ok && i < count; i++) {
		if (gp_box_is_empty(boxes[i]))
			continue;
		struct gp_box grown = { boxes[i].x0 - gap, boxes[i].y0 - gap,
					boxes[i].x1 + gap, boxes[i].y1 + gap };
		list.current = i;
		ok = gp_geos_index_query(index, grown, on_pair, &list) &&
		     !list.failed;
	}
	gp_geos_index_destroy(index);
	if (!ok) {
		free(list.items);
		return false;
	}
	if (list.count) /* qsort must not see the NULL of an empty list */
		qsort(list.items, list.count, sizeof(*list.items),
		      compare_pairs);
	*pairs = list.items;
	*pair_count = list.count;
	return true;
}
