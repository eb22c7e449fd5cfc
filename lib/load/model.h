/* The resolved design: every section of the description read, checked and
 * cross-referenced.  Names and strings are borrowed from the spec, which
 * the design owns. */
#ifndef GP_MODEL_H
#define GP_MODEL_H

#include "artwork.h"
#include "diag.h"
#include "digits-spec.h"
#include "drive-spec.h"
#include "font.h"
#include "geom.h"
#include "spec.h"

#include <stdbool.h>
#include <stdint.h>

struct gp_routing;

/* Design rules; defaults are common practice, no published source. */
struct gp_rules {
	int64_t min_line;         /* narrowest ITO line */
	int64_t min_space;        /* closest approach of two nets on a plate */
	int64_t registration;     /* plate-to-plate misalignment to survive */
	int64_t edge_clearance;   /* ITO to the plate's cut edge */
	int64_t chord_tolerance;  /* curve flattening */
	double registration_loss; /* lit-area loss allowed under misalignment */
	struct gp_where where;
};

/* Section 'electrical' (read by electrical-read.c): what the electrical
 * checks need.  Defaults in lib/base/findings.c (gp_check_limits_default). */
struct gp_electrical {
	bool given;
	struct gp_where where;
	double sheet_resistance[2]; /* ohm/square, by enum gp_plate */
	int64_t cell_gap;           /* nm */
	double permittivity;        /* relative, of the fluid */
	double max_lead_resistance; /* ohm; 0 = no limit */
	int64_t conductor_pitch;    /* elastomeric connector, nm; 0 = none */
};

/* How the PDF proof is drawn (section 'proof', proof-read.c).  Zero means
 * "not given": the proof then uses its defaults. */
struct gp_proof_spec {
	int paper;                /* 0 = chosen to fit, else table index + 1 */
	int series;               /* for a chosen paper: 0 ISO A, 1 US */
	int orientation;          /* 0 = either, 1 portrait, 2 landscape */
	int64_t span_tolerance;   /* on pattern spans (first to last cell) */
	int64_t outline_tolerance;/* on plate sizes (cutting) */
	const char *revision_date;/* as written, or NULL */
	struct gp_where where;
};

/* Sheet sizes, portrait, mm, that 'proof: paper' chooses from
 * (proof-read.c). */
struct gp_paper {
	const char *key, *name;
	double w, h;
	int series;               /* 0 ISO, 1 US */
};
#define GP_PAPER_COUNT 11
extern const struct gp_paper gp_papers[];

struct gp_plate_spec {
	struct gp_box box;        /* in the glass frame */
	struct gp_where where;
};

/* Limits against hostile descriptions: each keeps the work and memory of
 * one build bounded (measured: a design at every limit builds in well
 * under a minute), far above any real passive glass.  Every one is
 * reported with its value when exceeded. */
#define GP_MAX_BLOCKS 64
#define GP_MAX_CELLS 100000       /* cells in one block */
#define GP_MAX_DOTS_PER_CELL 4096
#define GP_MAX_NETS 4000          /* commons + segments of the design */
#define GP_MAX_PIXELS 1000000     /* dots of all blocks */
/* Every plate corner lies within this many mm of the origin, in x and
 * in y: the artwork then stays inside the Gerber format's +-9999.999999
 * mm with room for what is drawn around the plates. */
#define GP_MAX_GLASS_MM 9000

/* A dot-matrix block.  origin is the top-left corner of the top-left dot
 * of cell (line 0, cell 0); cells go right (+x), lines go down (-y), dots
 * inside a cell likewise. */
struct gp_block {
	const char *name;
	struct gp_where where;
	struct gp_point origin;
	long cells;               /* across */
	long lines;               /* down */
	long dots_across;
	long dots_down;
	int64_t dot_width, dot_height;
	int64_t dot_pitch_x, dot_pitch_y;
	int64_t cell_pitch;       /* across */
	int64_t line_pitch;       /* down */
	bool share_segments;      /* lines share segment columns */
	int commons_from;         /* block index whose commons are reused, -1 */
	struct gp_where commons_from_where;
};

#define GP_MAX_ICONS 512
#define GP_MAX_ICON_TEXT 4096    /* bytes of text over all icons */
#define GP_MAX_ICON_POINTS 4096   /* corners of one polygon icon */

enum gp_icon_kind {
	GP_ICON_TEXT,
	GP_ICON_RECTANGLE,
	GP_ICON_ROUNDED_RECTANGLE,
	GP_ICON_CIRCLE,
	GP_ICON_RING,
	GP_ICON_TRIANGLE,
	GP_ICON_ARROW,
	GP_ICON_POLYGON,
};

/* An icon: text set in a font or a shape, lit by one (common, segment)
 * pair.  position is the text's alignment point, a shape's centre, or the
 * point a polygon's corners are given from.  Shapes turn by rotation
 * (anticlockwise) about position after mirror (x -> -x). */
struct gp_icon {
	const char *name;
	struct gp_where where;
	enum gp_icon_kind kind;
	struct gp_point position;
	int rotation;             /* 0, 90, 180, 270 */
	bool mirror;
	/* text */
	const char *text;
	const char *font;         /* fontconfig pattern or file */
	struct gp_where text_where, font_where;
	struct gp_text_style style;
	/* shapes, nm */
	int64_t size[2];          /* rectangles; triangle: base, height;
				   * arrow: length, head width */
	int64_t radius;           /* rounded rectangle corners */
	int64_t diameter;         /* circle, ring (outside) */
	int64_t line;             /* ring width; arrow shaft width */
	int64_t head;             /* arrow head length */
	struct gp_point *points;  /* polygon corners, from position */
	size_t point_count;
	/* multiplex: a named icon common (or an existing COMn), a dot-matrix
	 * row's common, a digit row's common, or chosen by glassplot */
	const char *common;       /* NULL unless named */
	int common_block;         /* block index, or -1 */
	long common_row;          /* dot row over the whole block, 0-based */
	int common_digits;        /* digit row index, or -1 */
	int common_index;         /* that row's common, 1-based */
	/* a named icon segment (or an existing SEGn), or a digit's segment
	 * line */
	const char *segment;      /* NULL unless named */
	int segment_digits;       /* digit row index, or -1 */
	int segment_digit;        /* digit number in the row (0: sign unit) */
	int segment_line;         /* segment line of that digit, 1-based */
	/* slot: auto: glassplot chooses the (common, segment) pair, a spare
	 * slot of a digit row first (icon-layout.c) */
	bool auto_slot;
	struct gp_where slot_where;
	/* a cell of an array ('array:'): its name is made, cell counts from
	 * 1; turn is the arc's angle at the cell, degrees anticlockwise */
	char *made_name;          /* owned, or NULL */
	char *made_segment;       /* owned: a cell's own segment name */
	long cell;                /* 0 unless a cell of an array */
	double turn;
	struct gp_where common_where, segment_where;
};

struct gp_design {
	struct gp_spec *spec;
	const char *part;
	const char *revision;
	const char *title;
	struct gp_plate_spec front, back;
	bool plates_ok;               /* both plates read without error */
	struct gp_box viewing;
	struct gp_where viewing_where;
	enum gp_plate segment_plate;  /* plate carrying segments (front) */
	struct gp_rules rules;
	struct gp_block *blocks;
	size_t block_count;
	struct gp_digits *digits;     /* rows of segment digits */
	size_t digit_count;
	struct gp_proof_spec proof;
	struct gp_routing *routing;   /* routing sections, NULL if none */
	struct gp_icon *icons;
	size_t icon_count;
	struct gp_drive_spec drive;   /* sections 'drive' and 'optics' */
	struct gp_electrical electrical;
};

/* Reads every section of spec; takes ownership of spec (also on failure). */
struct gp_design *gp_design_from_spec(struct gp_spec *spec,
				      struct gp_diag *diag);

enum gp_plate gp_common_plate(const struct gp_design *design);

/* Section readers, one per module. */
bool gp_electrical_read(struct gp_design *design, const struct gp_node *node,
			struct gp_diag *diag);
void gp_electrical_defaults(struct gp_electrical *electrical);
bool gp_proof_read(struct gp_design *design, const struct gp_node *node,
		   struct gp_diag *diag);
bool gp_blocks_read(struct gp_design *design, const struct gp_node *node,
		    struct gp_diag *diag);
/* Reads the 'icons' section (after 'blocks' and 'rules'). */
bool gp_icons_read(struct gp_design *design, const struct gp_node *node,
		   struct gp_diag *diag);
/* Frees what gp_icons_read allocated. */
void gp_icons_free(struct gp_design *design);
/* Top-left corner of dot (row, col) of cell (line, cell) of a block,
 * computed from the origin directly: the span is the datum. */
struct gp_point gp_block_dot(const struct gp_block *block, long line,
			     long cell, long row, long col);
/* Height of one cell of a block, from its top dot row to its bottom. */
int64_t gp_block_cell_height(const struct gp_block *block);
/* Box of all dots of a block. */
struct gp_box gp_block_extent(const struct gp_block *block);

#endif
