/* Design-rule and electrical checks on the artwork (DESIGN.md section 5).
 *
 * The checks read the artwork (shapes with net and role, intended pixels)
 * and a plain struct of limits; they return findings, each naming a rule
 * of ours, a severity, the nets, a place (nm, glass frame), the measured
 * value and the limit.  All geometry goes through lib/geos.h: shapes are
 * found through STRtrees and tested as prepared geometries, never all
 * pairs; axis-aligned rectangles (dot-matrix strips and dots) are handled
 * exactly in integers without GEOS.
 *
 * What is checked where the artwork does not have it yet is skipped and
 * said in the report's notes (no seal: the viewing area stands in for the
 * inside of the seal; no leads or pads: no lead resistance, no connector
 * fit; no row time: no RC check). */
#ifndef GP_CHECK_H
#define GP_CHECK_H

#include "artwork.h"
#include "buffer.h"
#include "diag.h"
#include "geos.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

/* Stable rule names (gp_check_rule_name), listed in doc/check-rules.md. */
enum gp_check_rule {
	GP_CHECK_PARASITIC,     /* "parasitic-overlap" */
	GP_CHECK_SPACING,       /* "plate-spacing" */
	GP_CHECK_LINE_WIDTH,    /* "line-width" */
	GP_CHECK_REGISTRATION,  /* "registration-loss" */
	GP_CHECK_RESISTANCE,    /* "lead-resistance" */
	GP_CHECK_SPREAD,        /* "resistance-spread" */
	GP_CHECK_RC,            /* "rc-time" */
	GP_CHECK_CONNECTOR,     /* "connector-fit" */
	GP_CHECK_EDGE,          /* "edge-clearance" */
	GP_CHECK_VIEW,          /* "pixel-outside-view" */
	GP_CHECK_SEAL,          /* "seal-clearance" */
	GP_CHECK_DRIVE,         /* "drive-window" */
	GP_CHECK_RULE_COUNT
};

const char *gp_check_rule_name(enum gp_check_rule rule);
/* One line saying what the rule finds. */
const char *gp_check_rule_summary(enum gp_check_rule rule);

enum gp_check_unit {
	GP_UNIT_MM,
	GP_UNIT_MM2,
	GP_UNIT_FRACTION, /* 0..1 */
	GP_UNIT_OHM,
	GP_UNIT_SECOND,
	GP_UNIT_RATIO,
};
const char *gp_check_unit_name(enum gp_check_unit unit); /* "mm2", ... */
/* A finding's value in its unit, with enough digits for 1 nm or
 * 1e-6 mm^2 ("0.03 mm", "2.5%"); typeset: "mm²" instead of "mm2". */
void gp_check_format_value(char *text, size_t size, double value,
			   enum gp_check_unit unit, bool typeset);

struct gp_finding {
	enum gp_check_rule rule;
	enum gp_severity severity;
	int nets[2];              /* net indices, GP_NET_NONE when unused */
	struct gp_point place;    /* nm */
	double value;             /* measured, in unit */
	double limit;             /* in unit */
	enum gp_check_unit unit;
	int pixel;                /* pixel index, or -1 */
	int shape;                /* shape index, or -1 */
	int detail;               /* rule-specific: registration shift index
				   * (lib/patch.h), plate of a spacing */
	char text[400];           /* one line of explanation */
};

/* Per net: what the electrical checks computed. */
struct gp_net_load {
	double lead_squares;      /* squares along leads (series) */
	double line_squares;      /* squares along electrode strips */
	double resistance;        /* ohm: leads + half the strips (Elmore) */
	double capacitance;       /* F: sum over the net's pixels */
	double tau;               /* s: resistance x capacitance */
	size_t pixels;
};

/* Limits.  Defaults (gp_check_limits_default) are common practice, no
 * published source, except where said. */
struct gp_check_limits {
	int64_t min_line;         /* narrowest ITO line */
	int64_t min_space;        /* same plate, different nets */
	int64_t registration;     /* plate misalignment, x and y */
	int64_t edge_clearance;   /* ITO to the plate edge */
	int64_t chord_tolerance;
	double registration_loss; /* allowed lit-area loss, fraction */
	double min_overlap_mm2;   /* parasitic overlaps below this are noise
				   * (snapping to 1 nm), not findings */
	/* electrical */
	double sheet_resistance[2]; /* ohm/square, by enum gp_plate */
	double cell_gap;          /* m */
	double permittivity;      /* relative, of the fluid */
	double row_time;          /* s; 0 = not known, no RC check */
	double rc_warning;        /* row time under this many tau: warning */
	double rc_error;          /* row time under this many tau: error */
	double max_resistance;    /* ohm; 0 = no limit */
	double spread_warning;    /* largest/smallest lead resistance of one
				   * kind of net above this: warning */
	/* places; a box with x0 > x1 is absent */
	struct gp_box plate[2];   /* by enum gp_plate */
	struct gp_box viewing;
	/* inside edge of the seal when the design knows it (the seal band
	 * drawn with a fill port has no closed inner ring) */
	struct gp_box seal_inside;
	/* edge clearance of pads, by plate and by the edge they face
	 * (bottom, right, top, left as enum gp_side): a ledge's own
	 * clearance; < 0: edge_clearance */
	int64_t pad_clearance[2][4];
	/* connector: pads checked when pad_pitch > 0 */
	int64_t conductor_pitch;  /* elastomeric strip, 0 = none */
	int64_t min_conductors;   /* per pad and per gap */
};

void gp_check_limits_default(struct gp_check_limits *limits);

struct gp_design;
struct gp_build;
/* Limits from a design: its rules, plates, viewing area, 'electrical'
 * section and drive (row time 1/(N f) when a frame rate is given). */
void gp_check_limits_from_design(struct gp_check_limits *limits,
				 const struct gp_design *design);
/* The check stage of the pipeline: runs every check on build->art into
 * build->checks and adds a summary line.  False only on failure. */
bool gp_build_check(struct gp_build *build, struct gp_diag *diag);
struct gp_output_set;
/* report.txt and report.json into set, when the build writes reports. */
bool gp_build_add_check_reports(struct gp_build *build,
				struct gp_output_set *set, struct gp_diag *diag);

/* Vacuum permittivity, CODATA 2018 recommended value, F/m. */
#define GP_EPSILON_0 8.8541878128e-12

/* Parallel-plate capacitance of area mm^2 across gap m, in F. */
double gp_check_capacitance(double area_mm2, double gap, double permittivity);
/* Squares of a straight trace of length and width (nm), tapering
 * linearly from width w0 to w1: L ln(w1/w0) / (w1 - w0). */
double gp_check_squares(int64_t length, int64_t w0, int64_t w1);

struct gp_check_report {
	struct gp_finding *findings;
	size_t count, capacity;
	size_t errors, warnings;
	struct gp_net_load *nets; /* one per artwork net */
	size_t net_count;
	size_t pixels_checked;
	/* What was skipped or stood in, one line each. */
	struct gp_buffer notes;
	struct gp_check_limits limits; /* as used by the run */
};

void gp_check_report_init(struct gp_check_report *report);
/* Adds a finding made outside gp_check_run (the drive window); false when
 * out of memory. */
bool gp_check_report_add(struct gp_check_report *report,
			 const struct gp_finding *finding);
void gp_check_report_finish(struct gp_check_report *report);

/* Runs every check; findings go to report, failures (GEOS, memory) to
 * diag with a false return. */
bool gp_check_run(struct gp_geos *geos, const struct gp_artwork *art,
		  const struct gp_check_limits *limits,
		  struct gp_check_report *report, struct gp_diag *diag);

/* Registration of one pixel computed through GEOS (intersection areas),
 * whatever its shapes: for tests that cross-check the exact rectangle
 * arithmetic the run uses for dot pixels.  lit[9] as in lib/patch.h. */
bool gp_check_pixel_lit_geos(struct gp_geos *geos,
			     const struct gp_artwork *art, size_t pixel,
			     int64_t shift, double lit[9]);
bool gp_check_pixel_lit_exact(const struct gp_artwork *art, size_t pixel,
			      int64_t shift, double lit[9]);

/* --- reports (lib/check-report.c) --------------------------------------- */

/* Text report: the limits, the notes, one line per finding
 * ("error parasitic-overlap COM2 SEG1 at (0.7000, 1.2000) mm: ..."),
 * then the nets with the longest RC times. */
void gp_check_format_text(const struct gp_check_report *report,
			  const struct gp_artwork *art, const char *part,
			  const char *revision, struct gp_buffer *out);
/* The same as one JSON document (json-c) following
 * doc/report.schema.json. */
void gp_check_format_json(const struct gp_check_report *report,
			  const struct gp_artwork *art, const char *part,
			  const char *revision, struct gp_buffer *out);
/* Exit status for a command: 1 with errors (or, when strict, warnings),
 * else 0. */
int gp_check_exit_status(const struct gp_check_report *report, bool strict);

#endif
