/* Back-electrode patches under icons and segment digits (shared by both).
 *
 * A patch is the back-plate electrode of one common under a group of front
 * shapes.  It is the union of the front shapes grown by the registration
 * margin in x and in y (a Minkowski sum with a box, so that any plate shift
 * up to the margin along each axis, diagonal shifts included, keeps every
 * front shape over its patch), then
 *  (a) kept at least min_space from the patches of other commons: where two
 *      groups' grown shapes come too close, each gives up the half of the
 *      gap nearer the other's front shapes (split at the middle of the
 *      gap between the front shapes);
 *  (b) notched around front traces that are not intended pixels (lead-ins,
 *      bridges, any front trace): everything within clearance of such a
 *      trace is cut away, except what lies under the group's own front
 *      shapes, which always stay fully covered.
 * A notch or a narrow gap costs registration margin where it is; the
 * registration function below measures what is left.
 *
 * Units: nm for lengths, mm^2 for areas; results snapped to 1 nm with
 * outer rings counter-clockwise, holes clockwise (lib/geos.h). */
#ifndef GP_PATCH_H
#define GP_PATCH_H

#include "diag.h"
#include "geom.h"
#include "geos.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

/* The front shapes lit by one common (one patch). */
struct gp_patch_group {
	const char *name;               /* for messages: "COM2", "icon REC" */
	const struct gp_polygon *front; /* intended front shapes */
	size_t front_count;
};

struct gp_patch_rules {
	int64_t margin;          /* registration margin, in x and in y */
	int64_t min_space;       /* least gap between patches of two groups */
	int64_t clearance;       /* gap kept between a patch and a front trace */
	int64_t chord_tolerance; /* for the round clearances */
	/* Clear the traces by the box [-clearance, clearance]^2 (a Minkowski
	 * sum, exact for plate shifts of up to clearance in x and in y)
	 * instead of a round offset; false keeps the round one. */
	bool clearance_box;
};

/* Makes one patch per group: patches[i] (initialised by the caller) gets
 * group i's patch appended.  traces are the front-plate traces that must
 * not lie over any patch (their parts inside the groups' front shapes are
 * ignored).  Where a rule cannot be met (front shapes of two groups closer
 * than min_space, so that their patches cannot be kept apart) a warning is
 * recorded in diag naming both groups and the place; the patches are still
 * made.  Returns false on a GEOS or memory failure. */
bool gp_patch_make(struct gp_geos *geos, const struct gp_patch_group *groups,
		   size_t group_count, const struct gp_polygon *traces,
		   size_t trace_count, const struct gp_patch_rules *rules,
		   struct gp_polyset *patches, struct gp_diag *diag);

/* The 9 plate positions: shift k moves the back plate by
 * ((k % 3 - 1) * shift_x, (k / 3 - 1) * shift_y); k = 4 is nominal. */
#define GP_REGISTRATION_SHIFTS 9

struct gp_registration {
	double front_mm2;                     /* area of the front shape */
	double lit_mm2[GP_REGISTRATION_SHIFTS]; /* front and shifted back */
	double worst_mm2;                     /* least of lit_mm2 */
	int worst;                            /* its shift index */
};

/* Lit area (front intersected with the back shifted) in the 9 positions,
 * computed by GEOS without snapping. */
bool gp_patch_registration(struct gp_geos *geos,
			   const struct gp_polyset *front,
			   const struct gp_polyset *back, int64_t shift_x,
			   int64_t shift_y, struct gp_registration *out);
/* The same for shapes already in GEOS (the check module's fast path). */
bool gp_patch_registration_shapes(struct gp_geos *geos,
				  const struct gp_geos_shape *front,
				  const struct gp_geos_shape *back,
				  int64_t shift_x, int64_t shift_y,
				  struct gp_registration *out);

#endif
