/* The sections 'drive:' and 'optics:' as the description gives them, and
 * their readers (drive-read.c).  The arithmetic and the resolution against
 * the design's commons are in lib/drive/drive.h. */
#ifndef GP_DRIVE_SPEC_H
#define GP_DRIVE_SPEC_H

#include "diag.h"

#include <stdbool.h>
#include <stdint.h>

struct gp_design;
struct gp_node;

/* Largest duty we compute for; far beyond any passive glass. */
#define GP_DRIVE_MAX_COMMONS 100000L

/* Frame-rate limits: common practice, no published source. */
#define GP_DRIVE_FLICKER_HZ 60.0
#define GP_DRIVE_POWER_HZ 150.0

enum gp_drive_tc_unit {
	GP_DRIVE_TC_NONE,         /* no coefficient given */
	GP_DRIVE_TC_PERCENT,      /* %/degC of Vth */
	GP_DRIVE_TC_MILLIVOLT,    /* mV/degC of Vth */
};

/* --- the description: sections 'drive:' and 'optics:' -------------------- */

enum gp_display_mode { GP_MODE_UNSET, GP_MODE_POSITIVE, GP_MODE_NEGATIVE };
enum gp_display_type {
	GP_TYPE_UNSET, GP_TYPE_REFLECTIVE, GP_TYPE_TRANSFLECTIVE,
	GP_TYPE_TRANSMISSIVE,
};
enum gp_viewing { GP_VIEWING_UNSET, GP_VIEWING_6, GP_VIEWING_12 };
enum gp_fluid {
	GP_FLUID_UNSET, GP_FLUID_TN, GP_FLUID_STN, GP_FLUID_FSTN, GP_FLUID_HTN,
};
enum gp_connection {
	GP_CONNECTION_UNSET, GP_CONNECTION_ELASTOMERIC, GP_CONNECTION_PINS,
	GP_CONNECTION_HEAT_SEAL,
};

/* A value read from the description with its place; given is false when
 * the key was absent. */
struct gp_drive_value {
	bool given;
	struct gp_where where;
	double value;
};

/* The two sections as written; checked against the number of commons
 * only in gp_drive_resolve_spec, since that comes from the artwork. */
struct gp_drive_spec {
	bool has_drive, has_optics;
	struct gp_where drive_where, optics_where;
	/* drive: */
	struct gp_drive_value duty;      /* N of 1/N */
	struct gp_drive_value bias;      /* a of 1/a; value 0 = best */
	struct gp_drive_value vop;       /* V */
	struct gp_drive_value frame_rate;/* Hz */
	/* optics: */
	struct gp_drive_value threshold; /* V rms, 10% */
	struct gp_drive_value saturation;/* V rms, 90% */
	struct gp_drive_value coefficient;
	enum gp_drive_tc_unit tc_unit;
	struct gp_drive_value reference_temperature;  /* degC, default 25 */
	struct gp_drive_value operating[2];  /* degC */
	struct gp_drive_value storage[2];
	struct gp_where operating_where, storage_where;
	bool has_thickness;
	int64_t glass_thickness;         /* nm */
	struct gp_where thickness_where;
	enum gp_display_mode mode;
	enum gp_display_type type;
	enum gp_viewing viewing;
	enum gp_fluid fluid;
	enum gp_connection connection;
	const char *polarizer;           /* borrowed from the spec */
};

/* Readers for the top-level keys 'drive' and 'optics'; they fill
 * design->drive.  Errors are recorded at the value's place. */
bool gp_drive_read(struct gp_design *design, const struct gp_node *node,
		   struct gp_diag *diag);
bool gp_optics_read(struct gp_design *design, const struct gp_node *node,
		    struct gp_diag *diag);

#endif
