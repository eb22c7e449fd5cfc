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
#include "findings.h"
#include "geos.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

const char *gp_check_rule_name(enum gp_check_rule rule);
/* One line saying what the rule finds. */
const char *gp_check_rule_summary(enum gp_check_rule rule);

const char *gp_check_unit_name(enum gp_check_unit unit); /* "mm2", ... */
/* A finding's value in its unit, with enough digits for 1 nm or
 * 1e-6 mm^2 ("0.03 mm", "2.5%"); typeset: "mm²" instead of "mm2". */
void gp_check_format_value(char *text, size_t size, double value,
			   enum gp_check_unit unit, bool typeset);

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
bool gp_build_add_check_reports(const struct gp_build *build,
				struct gp_output_set *set, struct gp_diag *diag);

/* Vacuum permittivity, CODATA 2018 recommended value, F/m. */
#define GP_EPSILON_0 8.8541878128e-12

/* Parallel-plate capacitance of area mm^2 across gap m, in F. */
double gp_check_capacitance(double area_mm2, double gap, double permittivity);
/* Squares of a straight trace of length and width (nm), tapering
 * linearly from width w0 to w1: L ln(w1/w0) / (w1 - w0). */
double gp_check_squares(int64_t length, int64_t w0, int64_t w1);

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
