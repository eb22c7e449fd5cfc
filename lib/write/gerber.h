/* The Gerber RS-274X writer.
 *
 * Writes one layer of the artwork as an extended Gerber file conforming to
 * the Gerber Layer Format Specification (Ucamco, revision 2024.05), without
 * its deprecated constructs: millimetres, format 4.6 (so a coordinate
 * integer is the nanometre value and every coordinate is exact), X2 file
 * attributes in the header, one region (G36/G37) per filled shape with the
 * holes joined to the outer contour by cut-ins, strokes drawn with circular
 * apertures, rectangular pads flashed, M02 last.
 *
 * Attributes (5.2-5.6): .GenerationSoftware, .CreationDate, .ProjectId,
 * .FileFunction (Profile,NP for outlines, Other for the rest),
 * .FilePolarity, .Part, .SameCoordinates and .MD5; .AperFunction on every
 * aperture and region; on the ITO .N (the net, empty for text and marks)
 * on every object and .P (ledge, pin, net) on every ledge pad.  gerbv 2.9
 * reports each %TF, %TA, %TO and %TD line as an unknown extension; the
 * spec (2.12) does not ask a writer to cater for one reader's limits. */
#ifndef GP_GERBER_H
#define GP_GERBER_H

#include "artwork.h"
#include "buffer.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

/* A ledge pad as a pin, for the .P attribute. */
struct gp_gerber_pin {
	struct gp_box box;      /* the pad, as drawn */
	int number;
	const char *refdes;     /* the ledge's name */
};

/* The side a file is drawn from.  The description's frame (x right, y up)
 * is the viewer's: the viewer looks through the front plate at its inner,
 * coated face, and at the back plate's inner face directly.  A mask or
 * screen is laid on the coated face, so seen from there the front plate's
 * layers are the viewer's drawing mirrored, the back plate's are not. */
enum gp_gerber_face {
	GP_GERBER_FACE_VIEWER,  /* as the viewer sees the glass */
	GP_GERBER_FACE_COATED,  /* as seen looking at the plate's coated face */
};

struct gp_gerber_info {
	/* Part number of the glass, or NULL.  Written in a comment and as the
	 * .SameCoordinates identifier shared by every layer of the set. */
	const char *part_number;
	/* glassplot's version for .GenerationSoftware, or NULL ("0"). */
	const char *version;
	/* ISO 8601 time for .CreationDate ("2024-05-01T12:00:00+00:00", see
	 * gp_gerber_format_date), or NULL to write no date at all: the output
	 * then depends on nothing but the artwork. */
	const char *creation_date;
	/* Revision for .ProjectId, or NULL ("0"). */
	const char *revision;
	/* The side every file is drawn from, and for GP_GERBER_FACE_COATED
	 * the axis the front plate's layers are mirrored about: the vertical
	 * line x = mirror_axis (nm; x becomes 2 * mirror_axis - x).  Both
	 * are stated in the header: a G04 comment and the free text of
	 * .FileFunction (Other).  A mirrored file gets its own
	 * .SameCoordinates identifier (5.6.7: files with one identifier
	 * align), the part number followed by " mirrored". */
	enum gp_gerber_face face;
	int64_t mirror_axis;
	/* The ledge pads, matched to the flashed pads by their box. */
	const struct gp_gerber_pin *pins;
	size_t pin_count;
};

/* Largest coordinate magnitude format 4.6 can hold: 9999.999999 mm. */
#define GP_GERBER_COORD_MAX INT64_C(9999999999)

/* Appends the Gerber file for one layer to out.  Shapes are written in the
 * artwork's order: a shape with line_width > 0 as a stroke of its outer
 * ring (open or closed path) with a circular aperture; a GP_ROLE_PAD shape
 * that is an axis-aligned rectangle (with an exact centre) as a flash of a
 * rectangular aperture; every other shape as a region
 * (gp_gerber_region_contours).  Returns false, leaving out in an
 * unspecified state, on a coordinate outside +-GP_GERBER_COORD_MAX, a
 * filled ring with less than three distinct points, a region that cannot
 * be written as valid contours, or out of memory, and writes into why
 * (why_size bytes, 256 is enough; why may be NULL) which shape failed
 * (role, net, lower left corner in mm) and why. */
bool gp_gerber_write_why(struct gp_buffer *out, const struct gp_artwork *art,
			 enum gp_layer layer,
			 const struct gp_gerber_info *info, char *why,
			 size_t why_size);

/* Formats seconds since the epoch (SOURCE_DATE_EPOCH) as the ISO 8601
 * UTC time .CreationDate wants, "YYYY-MM-DDThh:mm:ss+00:00".  False when
 * the time cannot be represented or size is too small (26 is enough). */
bool gp_gerber_format_date(char *buffer, size_t size, int64_t epoch);

/* Joins the holes of poly to its outer ring with cut-ins, giving one
 * contour whose interior is the polygon: outer ring counter-clockwise,
 * each hole clockwise.  Every cut-in is a pair of fully coincident
 * horizontal segments on the nanometre grid (Gerber Layer Format
 * Specification 2024.05, 4.10.3: "cut-ins must be either horizontal or
 * vertical"; "all cut-ins in a contour must have the same direction"):
 * from a vertex of the hole along +x or -x to the first edge met from the
 * material side.  Where that edge is not met at whole nanometres, the cut-
 * in ends at the last whole nanometre before it and the edge bends
 * through that point (the region loses a sliver under 1 nm wide).  The
 * result has no zero-length segment, is not explicitly closed, and is
 * checked against 4.10.3: no two segments cross or overlap except cut-in
 * pairs; a point is passed twice only as the end of one cut-in ("points
 * where more than two segments end" are not allowed otherwise).  False,
 * with *why, on an invalid polygon and on one that has no such contour (a
 * hole touching the outer ring or another hole: see
 * gp_gerber_region_contours).  Cost grows with holes x points: 900 holes
 * take ~35 ms, 10000 ~3 s. */
bool gp_gerber_join_holes(struct gp_ring *contour,
			  const struct gp_polygon *poly, const char **why);

/* The contours of one region. */
struct gp_gerber_contours {
	struct gp_ring *rings;
	size_t count, capacity;
};

void gp_gerber_contours_init(struct gp_gerber_contours *list);
void gp_gerber_contours_finish(struct gp_gerber_contours *list);

/* The contours a region statement (G36/G37) draws poly with: one
 * (gp_gerber_join_holes) when it can, else the pieces of poly cut in two
 * along a whole-nanometre line through a hole that cannot be joined (with
 * GEOS, again until each piece has a valid contour; contours of one region
 * may touch, 4.10.4.4).  list is initialised here; on false (*why set)
 * it is left empty. */
bool gp_gerber_region_contours(struct gp_gerber_contours *list,
			       const struct gp_polygon *poly,
			       const char **why);

#endif
