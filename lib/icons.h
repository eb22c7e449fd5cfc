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

/* What a lead-in keeps away from. */
struct gp_lead_keep {
	struct gp_geos_shape *same;    /* same plate, other nets */
	int64_t same_distance;
	struct gp_geos_shape *other;   /* other plate, other nets */
	int64_t other_distance;
	/* bounds the lead must run past (those the router tests its straight
	 * lead-outs against), and by how much */
	const struct gp_box *beyond;
	size_t beyond_count;
	int64_t past;
	/* bounds on the lead's own plate that no straight way out may pass
	 * (within same_distance) beyond the part */
	const struct gp_box *blocked;
	size_t blocked_count;
};

/* A straight lead-in of the given width from one of the polygons of from
 * towards side (enum gp_side: bottom, right, top, left): starting up to a
 * width inside the part it leaves last, ending past every `beyond` box in
 * its band, its part outside from clear of the keep-outs.  Tried at the
 * part's outermost point that way first, then in steps of one width to
 * either side.  *end is a width back from the far end (where a further
 * lead may start); *found false when no position works. */
bool gp_lead_find(struct gp_geos *geos, const struct gp_polyset *from,
		  int side, int64_t width, const struct gp_lead_keep *keep,
		  struct gp_polygon *lead, struct gp_point *end, bool *found);

#endif
