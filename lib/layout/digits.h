/* Segment digits: 7-, 14- and 16-segment figures with decimal points,
 * colons, a minus sign and a leading half digit "1", static or multiplexed
 * at 1/2, 1/3 or 1/4 duty.
 *
 * Geometry is constructed from the parameters, not from a drawn template.
 * Each segment is a convex polygon: the intersection of its stroke (a strip
 * `stroke` wide measured perpendicular to the segment) with half-planes.
 * Neighbouring segments share a cut line; each gives up half the gap (or
 * the whole of it, for square ends) measured perpendicular to that line, so
 * the gap between any two neighbours is the same everywhere.  Slant is a
 * shear x' = x + y tan(slant) of the construction points only: the strips
 * and offsets are laid out after shearing, so heights stay exact and the
 * stroke and gap stay their stated size perpendicular to the edges.
 *
 * Coordinates: int64_t nm, glass frame, x right, y up.  A figure's origin
 * is the bottom-left corner of its upright outline (before shearing);
 * digit i (0-based) of a row sits at origin + i * pitch, computed directly
 * (the span is the datum). */
#ifndef GP_DIGITS_H
#define GP_DIGITS_H

#include "diag.h"
#include "digits-spec.h"
#include "geom.h"
#include "spec.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

/* Builds the segments of one figure: out[i] (initialised here) receives
 * segment i in the figure's order, a convex counter-clockwise polygon.
 * False on failure (out of memory, or parameters so tight that a segment
 * vanishes; diag says which, naming `what` at `where`); out is then
 * finished. */
bool gp_figure_build(const struct gp_figure_spec *spec, struct gp_point origin,
		     const char *what, const struct gp_where *where,
		     struct gp_polygon *out, struct gp_diag *diag);

/* The construction lines of a figure, in nm relative to its origin, in
 * upright coordinates (u across, v up; the glass point is
 * (u + v * t, v)), for laying out what goes around the segments. */
struct gp_figure_frame {
	double t, sec;            /* tan(slant), 1 / cos(slant) */
	double W, H, S, G;
	double sv;                /* upright stroke measured across (S sec) */
	double il, ir;            /* sides of the centre upright */
	double cc;                /* centre cut (g1|g2, a1|a2, d1|d2) */
	double mlo, mtop, m;      /* middle bar and its centre */
	double mc;                /* the cut between upper and lower halves */
};

void gp_figure_frame(const struct gp_figure_spec *spec,
		     struct gp_figure_frame *frame);

/* Horizontal offset (nm) of the slanted outline at height y above the
 * origin: y * tan(slant), rounded. */
int64_t gp_figure_shear(const struct gp_figure_spec *spec, int64_t y);

/* A dot (decimal point or colon dot) with its centre at c.  Round dots
 * have vertices on the circle, spaced so that the chord error is at most
 * chord_tolerance; square dots are sheared by the slant. */
bool gp_dot_build(enum gp_dot_shape shape, int64_t size, double slant,
		  struct gp_point c, int64_t chord_tolerance,
		  struct gp_polygon *out);

/* Default centre of the decimal point of a figure at origin: on the
 * baseline, `gap` clear of the figure's right side measured perpendicular
 * to that side. */
struct gp_point gp_point_default_centre(const struct gp_figure_spec *spec,
					struct gp_point origin,
					enum gp_dot_shape shape, int64_t size,
					int64_t gap);

/* --- units and parts ------------------------------------------------------ */

/* One drivable part of a unit: a segment, the point, the colon, the minus
 * or the "1".  A part may have two polygons (colon, "1"). */
struct gp_digit_part {
	char name[8];
	struct gp_polygon poly[2];
	int poly_count;
	double height;            /* for ordering commons top down, nm */
	/* assignment, 1-based; 0 until assigned */
	int common;
	int line;
	/* nets once laid out (indices into the artwork), else -1 */
	int common_net;
	int segment_net;
};

/* A front trace of a unit: a lead-in from a part toward the ledge, or the
 * bar joining the lead-ins of one segment line below the unit. */
struct gp_digit_trace {
	struct gp_polygon poly;
	int part;                 /* part it starts from, -1 for a bar */
	int piece;                /* which polygon of that part */
	int part2;                /* part a bridge ends in, else -1 */
	int line;                 /* segment line, 1-based, once assigned */
	double u_end;             /* upright position where it ends, nm */
};

#define GP_UNIT_MAX_TRACES (2 * GP_UNIT_MAX_PARTS + 8)

/* A unit: digit 1..count, or unit 0 for the minus and "1" (when any). */
struct gp_digit_unit {
	int number;               /* 0 for the sign unit, else the digit */
	struct gp_point origin;   /* bottom-left of the upright outline */
	struct gp_digit_part parts[GP_UNIT_MAX_PARTS];
	int part_count;
	struct gp_digit_trace traces[GP_UNIT_MAX_TRACES];
	int trace_count;
	/* parts in the order their lead-ins reach the lower edge, left to
	 * right (a part with two lead-ins once) */
	int order[GP_UNIT_MAX_PARTS];
	int line_count;           /* segment lines of this unit */
	int first_line_net;       /* net of line 1, once laid out */
};

/* Where a segment line leaves a row toward the ledge (the lower edge, -y):
 * the end of its lead-in, for the routing to continue from. */
struct gp_digit_port {
	int net;                  /* -1 until the layout makes the nets */
	int unit, line;           /* unit index in the row, line 1-based */
	struct gp_point at;       /* centre of the lead-in's end */
	int64_t width;
};

/* What the layout made of one row: units with their parts and nets (the
 * firmware map: parts[k].common_net / segment_net light parts[k]). */
struct gp_digit_row {
	struct gp_digit_unit *units;
	size_t unit_count;
	int first_common, common_count;   /* net indices */
	int first_segment, segment_count;
	struct gp_digit_port *ports;
	size_t port_count;
};

/* Line width and spacing for the lead-ins, and the shift to survive. */
struct gp_digit_rules {
	int64_t line;             /* lead-in width */
	int64_t space;            /* between different nets on a plate */
	int64_t registration;
	int64_t chord_tolerance;
};

/* Whether a row is laid out as a grid (see digits-plan.c): 7 segments
 * with a point on every digit at 1/4 duty, no colon, no sign unit, the
 * documented assignment.  Its segment lines run inside the digits and its
 * commons across them, so that the commons can be joined digit to digit. */
bool gp_digits_grid(const struct gp_digits *row);

/* A line width wide along pts (mitred corners, square ends), as one
 * polygon.  n <= 8. */
bool gp_digit_thick_line(const struct gp_point *pts, size_t n, int64_t width,
			 struct gp_polygon *out);

/* Geometry, lead-ins and assignment of one row (no nets yet).  out is
 * initialised here; free it with gp_digit_row_finish. */
bool gp_digits_plan(const struct gp_digits *row,
		    const struct gp_digit_rules *rules, struct gp_digit_row *out,
		    struct gp_diag *diag);
void gp_digit_row_finish(struct gp_digit_row *row);

struct gp_build;
/* Lays out every row of the design into the build (after the blocks):
 * nets, electrodes, lead-ins, pixels, back patches; build->digit_rows
 * keeps the units, the assignment and the ports. */
bool gp_digits_layout(struct gp_build *build, struct gp_diag *diag);
void gp_digit_rows_free(struct gp_digit_row *rows, size_t count);

struct gp_pixel;
/* "digits clock digit 2 g", "digits clock sign minus": what a digit pixel
 * is, for the firmware map and reports. */
void gp_digits_pixel_label(const struct gp_build *build,
			   const struct gp_pixel *px, char *buffer, size_t size);

/* The name of a unit for messages: "digit 3" or "the sign unit". */
void gp_digit_unit_label(const struct gp_digit_unit *unit, char *buffer,
			 size_t size);

#endif
