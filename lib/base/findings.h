/* What the checks find, as plain data (the functions are in check.h):
 * rules, units, findings, per-net loads, the limits a run used and the
 * report that holds them.  Kept here so that the build, which every stage
 * sees, can hold a report by value. */
#ifndef GP_FINDINGS_H
#define GP_FINDINGS_H

#include "artwork.h"
#include "buffer.h"
#include "diag.h"
#include "geom.h"

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

enum gp_check_unit {
	GP_UNIT_MM,
	GP_UNIT_MM2,
	GP_UNIT_FRACTION, /* 0..1 */
	GP_UNIT_OHM,
	GP_UNIT_SECOND,
	GP_UNIT_RATIO,
};

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

/* The limits a run uses unless the design says otherwise (findings.c). */
void gp_check_limits_default(struct gp_check_limits *limits);

#endif
