/* Routing: lead-outs from the electrodes to pads on the contact ledge(s),
 * common transfers, the seal with its fill port, the cut outlines, the
 * alignment marks, and the pin table and firmware map written from them.
 *
 * Units: int64_t nanometres in the glass frame (x right, y up).
 *
 * How electrodes ask for a lead.  Any layout stage (blocks, digits, icons)
 * says where each of its nets may be led out with gp_build_add_lead_end():
 * a point on the electrode's edge, the side of the glass the lead leaves
 * towards (straight, perpendicular to that side) and the widest lead the
 * electrode takes there.  A net may offer several ends; the router takes
 * one: the one towards its ledge when it can, otherwise the first that is
 * not blocked, in the order they were added.  Dot-matrix blocks need not
 * add ends: the router knows their strips (segments end top and bottom,
 * commons left and right).
 *
 * Inside the seal a lead runs straight from its end to the seal and across
 * the seal band on the electrode's own plate, so it never crosses the other
 * plate's electrodes; a net whose pads are on the other plate changes
 * plates through common-transfer dots in (or just outside) the seal band.
 * Outside the seal leads run on the ledge's plate in concentric tracks
 * around the seal and fan out to the pads with straight and 45-degree
 * segments.  The pad order follows the order in which the leads leave the
 * seal, walking round it from the side opposite the ledge, so the routing
 * is planar by construction. */
#ifndef GP_ROUTE_H
#define GP_ROUTE_H

#include "artwork.h"
#include "buffer.h"
#include "diag.h"
#include "geom.h"
#include "route-spec.h"
#include "spec.h"
#include "stage.h"

#include <stdbool.h>
#include <stdint.h>

struct gp_build;
struct gp_design;

/* Routes every net to a pad and adds the seal, transfers and marks.  Does
 * nothing when the description has no ledge (the seal and marks are still
 * drawn when given).  Errors name the nets, the place and the room. */
bool gp_route_layout(struct gp_build *build, struct gp_diag *diag);

/* Cut outlines of both plates. */
bool gp_outlines_layout(struct gp_build *build, struct gp_diag *diag);

struct gp_geos;

/* The seal band (with its fill port), alignment marks and part text, for
 * the seal boxes in and out.  Called by gp_route_layout. */
bool gp_seal_layout(struct gp_build *build, const struct gp_box *in,
		    const struct gp_box *out, struct gp_geos *geos,
		    struct gp_diag *diag);

/* Seal band boxes (inner edge and outer edge) of a design with a seal. */
void gp_seal_boxes(const struct gp_design *design, struct gp_box *inner,
		   struct gp_box *outer);
/* The fill port along its side of the seal: from *a to *b, on a side that
 * runs from *lo to *hi inside the seal (nm). */
void gp_seal_port_span(const struct gp_design *design, int64_t *a,
		       int64_t *b, int64_t *lo, int64_t *hi);

#endif
