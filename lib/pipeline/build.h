/* The build: one design laid out, routed and checked.  Each stage reads the
 * design and what earlier stages put here, and adds its own results. */
#ifndef GP_BUILD_H
#define GP_BUILD_H

#include "artwork.h"
#include "buffer.h"
#include "check.h"
#include "diag.h"
#include "drive.h"
#include "model.h"
#include "output.h"
#include "route.h"

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
	/* content to preview lit (gp_build_show), or NULL */
	struct gp_show *show;
	void (*progress)(const char *stage, void *data);
	void *progress_data;
};

struct gp_staged_file;
/* Writes the dependency file for set, to be committed into folder, under
 * a temporary name beside build->depfile (depfile.c). */
bool gp_depfile_stage(const struct gp_build *build,
		      const struct gp_output_set *set, const char *folder,
		      struct gp_staged_file *file, struct gp_diag *diag);

/* Should this kind of output be written? */
bool gp_build_wants(const struct gp_build *build, enum gp_output_kind kind);
/* Records a file the build read (a font, ...); once per path. */
bool gp_build_add_input(struct gp_build *build, const char *path);
/* The date every output carries, "YYYY-MM-DD", or NULL without an epoch. */
const char *gp_build_date(const struct gp_build *build, char *buffer,
			  size_t size);

/* Lays out every dot-matrix block: nets, electrode strips, pixels. */
bool gp_blocks_layout(struct gp_build *build, struct gp_diag *diag);

/* Net index of a block's common for dot row `row` (0-based over the whole
 * block, line by line), or -1 if out of range. */
int gp_block_common_net(const struct gp_build *build, size_t block, long row);

/* Renders every output of the build into set, in memory, touching no
 * file: gp_build_write is this followed by gp_output_commit.  Every
 * writer is called from here, so that the outputs in memory and on disk
 * are the same set.  The fuzz
 * harness and tests use it to run the whole pipeline without a disk. */
bool gp_build_outputs(struct gp_build *build,
		      struct gp_output_set *set,
		      struct gp_diag *diag);

/* The drive of a design on the commons its layout makes: runs the
 * layout stages (blocks, digits, icons) on a scratch build and resolves
 * the drive against their COM nets, with or without a drive section
 * (gp_drive_resolve_spec; an empty window is an error in diag and
 * report->result.feasible false).  For 'glassplot drive' and tests. */
bool gp_design_drive(const struct gp_design *design,
		     struct gp_drive_report *report, struct gp_diag *diag);

/* Lays out every icon: nets, front electrodes and bridges, back patches
 * and bridges, pixels, summary lines (icon-layout.c). */
bool gp_icons_layout(struct gp_build *build, struct gp_diag *diag);

/* Cut outlines of both plates. */
bool gp_outlines_layout(struct gp_build *build, struct gp_diag *diag);

#endif
