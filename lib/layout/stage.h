/* The build as every stage sees it: one design laid out, routed and
 * checked.  Each stage (layout, routing, checks, writers) reads the design
 * and what earlier stages put here, and adds its own results; the pipeline
 * (lib/pipeline/build.h) runs them in order.  Kept in the first room that
 * fills it, so that no stage includes the pipeline. */
#ifndef GP_STAGE_H
#define GP_STAGE_H

#include "artwork.h"
#include "buffer.h"
#include "diag.h"
#include "drive.h"
#include "findings.h"
#include "geom.h"
#include "model.h"
#include "route-spec.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

struct gp_digit_row;

/* A place where a net's electrode may be led out. */
struct gp_lead_end {
	int net;
	enum gp_side side;        /* the lead leaves towards this side */
	struct gp_point at;       /* centre of the lead on the electrode edge */
	int64_t width;            /* widest lead the electrode takes there */
};

/* A pad on a ledge. */
struct gp_pin {
	int number;
	int ledge;                /* index into build->ledges */
	struct gp_point centre;
	struct gp_box box;        /* the pad */
	int net;                  /* net index, or GP_NET_NONE */
};

struct gp_block_nets {
	int first_common;         /* net index of the block's first common */
	int first_segment;        /* net index of the block's first segment */
	long common_count;
	long segment_count;
};

/* Kinds of output, for writing a subset (gp_build_select). */
enum gp_output_kind {
	GP_OUTPUT_GERBER = 1 << 0,
	GP_OUTPUT_PROOF = 1 << 1,     /* proof.pdf */
	GP_OUTPUT_PINS = 1 << 2,      /* pins.csv */
	GP_OUTPUT_FIRMWARE = 1 << 3,  /* the C header */
	GP_OUTPUT_REPORT = 1 << 4,    /* report.txt, report.json */
	GP_OUTPUT_ALL = (1 << 5) - 1,
};

/* Gerber sets (gp_build_set_faces). */
enum gp_faces {
	GP_FACES_VIEWER = 1 << 0,     /* NAME.gbr, as the viewer sees it */
	GP_FACES_COATED = 1 << 1,     /* NAME-coated.gbr, from each plate's
				       * coated face */
};

struct gp_show;

struct gp_build {
	const struct gp_design *design;
	struct gp_artwork art;
	struct gp_block_nets *blocks;   /* one per design block */
	struct gp_digit_row *digit_rows; /* one per design digit row */
	size_t digit_row_count;         /* rows laid out */
	struct gp_buffer summary;
	/* Lines for the summary added by stages ("font: ..."), newline-ended. */
	struct gp_buffer notes;
	/* Lead ends offered by layout stages (gp_build_add_lead_end). */
	struct gp_lead_end *ends;
	size_t end_count, end_capacity;
	/* Pads made by routing, in ledge order. */
	struct gp_pin *pins;
	size_t pin_count;
	/* The description's ledges as the routing resolved them (plate,
	 * pin 1, pin map); the design itself is not changed. */
	struct gp_ledge ledges[GP_MAX_LEDGES];
	size_t ledge_count;
	/* Files read besides the description (fonts...), one per line, for
	 * dependency files. */
	struct gp_buffer inputs;
	/* Names of the files written by gp_build_write, one per line. */
	struct gp_buffer written;
	struct gp_buffer json;
	unsigned outputs;               /* enum gp_output_kind bits */
	bool outputs_chosen;            /* by gp_build_select (--only) */
	/* Gerber sets to write (gp_build_set_faces): bit 0 the viewer's
	 * (NAME.gbr), bit 1 the coated faces' (NAME-coated.gbr); 0 is the
	 * viewer's only. */
	unsigned faces;
	const char *depfile;            /* gp_build_set_depfile, borrowed */
	bool has_epoch;                 /* SOURCE_DATE_EPOCH given */
	int64_t epoch;
	/* The drive resolved against the commons the layout made (N is
	 * art.common_count, counted once, from the artwork), when the
	 * description has a 'drive' or 'optics' section. */
	bool has_drive;
	struct gp_drive_report drive;
	/* findings of the check stage (lib/check.h) */
	struct gp_check_report checks;
	bool checked;
	struct gp_buffer check_text, check_json;
	/* content to preview lit (gp_build_show, lib/write/preview.h), or
	 * NULL */
	struct gp_show *show;
	void (*progress)(const char *stage, void *data);
	void *progress_data;
};

/* Should this kind of output be written? */
bool gp_build_wants(const struct gp_build *build, enum gp_output_kind kind);
/* Records a file the build read (a font, ...); once per path. */
bool gp_build_add_input(struct gp_build *build, const char *path);
/* The date every output carries, "YYYY-MM-DD", or NULL without an epoch. */
const char *gp_build_date(const struct gp_build *build, char *buffer,
			  size_t size);
/* Offers an end for net: where its electrode may be led out, as
 * lib/route/route.h explains.  False when out of memory. */
bool gp_build_add_lead_end(struct gp_build *build, int net,
			   enum gp_side side, struct gp_point at,
			   int64_t width);

#endif
