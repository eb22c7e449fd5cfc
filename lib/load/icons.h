/* Icon geometry: shape outlines, the width and space checks and the
 * bridges that join the parts of one electrode.  Used by the icon layout
 * (icon-layout.c) and its tests.  Lengths in nm, glass frame. */
#ifndef GP_ICONS_H
#define GP_ICONS_H

#include "geos.h"
#include "model.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

/* Electrode of a shape icon (any kind but text) as valid polygons,
 * appended to out.  Curves are flattened with their vertices on the curve,
 * within tolerance of it. */
bool gp_icon_shape(struct gp_geos *geos, const struct gp_icon *icon,
		   int64_t tolerance, struct gp_polyset *out);

/* Parts of set narrower than width: what an opening with a mitred square
 * of that width cannot reach (corners are kept by the mitre, so only
 * strokes, not sharp corners, show), pieces of more than width^2 / 2
 * appended to out. */
bool gp_thin_parts(struct gp_geos *geos, const struct gp_polyset *set,
		   int64_t width, struct gp_polyset *out);

/* Gaps narrower than space inside one polygon (counters, notches): what
 * a mitred closing fills, pieces of more than space^2 / 2 appended to
 * out. */
bool gp_narrow_gaps(struct gp_geos *geos, const struct gp_polygon *poly,
		    int64_t space, struct gp_polyset *out);

/* Something a bridge keeps away from, by at least distance. */
struct gp_keepout {
	struct gp_geos_shape *shape;
	int64_t distance;
};

/* A straight bridge of the given width from part a to part b: along the
 * line through their nearest points when its part outside a and b keeps
 * clear of every keep-out, otherwise along the nearest parallel that does
 * (in steps of one width), over the shortest run of that line from one
 * part to the other.  The bridge reaches up to width into both parts.  *found is false (and out untouched) when there is none. */
bool gp_bridge_find(struct gp_geos *geos, const struct gp_polygon *a,
		    const struct gp_polygon *b, int64_t width,
		    const struct gp_keepout *keep, size_t keep_count,
		    struct gp_polyset *out, bool *found);

/* Joins every polygon of parts into one piece with bridges along a
 * minimum spanning tree of their distances; bridges are appended to out.
 * *unjoined counts tree edges no bridge could be found for, and *where is
 * then the middle of the first of them. */
bool gp_bridges_join(struct gp_geos *geos, const struct gp_polyset *parts,
		     int64_t width, const struct gp_keepout *keep,
		     size_t keep_count, struct gp_polyset *out,
		     size_t *unjoined, struct gp_point *where);

#endif
