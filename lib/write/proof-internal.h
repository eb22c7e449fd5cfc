/* Shared by the files of the proof (proof*.c); not part of any API.
 *
 * Every drawing call works in paper millimetres, y down from the top-left
 * corner of the sheet: the page's CTM scales points to millimetres once. */
#ifndef GP_PROOF_INTERNAL_H
#define GP_PROOF_INTERNAL_H

#include "pintable.h"
#include "proof.h"

#include <cairo.h>
#include <stdint.h>

/* Glass-to-paper mapping of one view: paper x = ox + s * x_mm,
 * paper y = oy - s * y_mm. */
struct proof_view {
	double ox, oy, s;
	/* when set, shapes wholly outside window are left out (the view is
	 * clipped to it anyway) */
	bool windowed;
	struct gp_box window;
};

struct rgb {
	double r, g, b;
};

/* Colours of our own for the drawing. */
extern const struct rgb proof_front_colour;    /* front-plate ITO */
extern const struct rgb proof_back_colour;     /* back-plate ITO */
extern const struct rgb proof_seal_colour;
extern const struct rgb proof_transfer_colour;
extern const struct rgb proof_dim_colour;      /* dimension lines */
extern const struct rgb proof_finding_colour;
extern const struct rgb proof_viewing_colour;  /* viewing area line */

/* How the legend shows an item: a filled swatch, or a sample of a line. */
enum proof_swatch { SWATCH_FILL, SWATCH_SOLID, SWATCH_DASHED, SWATCH_DASH_DOT };

struct proof_legend_item {
	const char *label;
	struct rgb colour;
	double alpha;             /* as painted over the white sheet */
	enum proof_swatch swatch;
};

/* The overview's legend; the tests check its colours for a colour-blind
 * reader. */
extern const struct proof_legend_item proof_overview_legend[];
extern const int proof_overview_legend_count;

/* One block's dots as cairo recording surfaces, each covering one line
 * of cells (origin at the first cell's top-left dot corner, paper mm at
 * the view scale): all dots, and the two halves of a dot checkerboard. */
struct proof_cells {
	cairo_surface_t *all, *even, *odd;
	double scale;
};

/* Per net: how many pixels it drives and its first pixel. */
struct proof_net_use {
	long pixels;
	long first_pixel;   /* -1 when none */
};

struct proof {
	cairo_t *cr;
	const struct gp_build *build;
	const struct gp_design *design;
	const struct gp_artwork *art;
	struct gp_proof_plan plan;
	struct proof_view view;     /* the overview's glass placement */
	int sheet;                  /* current sheet, 1-based */
	struct proof_cells *cells;  /* one per block */
	/* Each layer drawn once at the overview's view, painted on every
	 * sheet that shows it whole (the PDF holds it once). */
	cairo_surface_t *layers[GP_LAYER_COUNT];
	struct proof_net_use *use;  /* one per net */
	int *pin_order;             /* net indices in pin table order */
	/* pin-matrix.csv's rows, when routed */
	struct gp_pin_matrix matrix;
	bool has_matrix;
	double *matrix_widths;      /* per common, measured when planning */
	int *matrix_filled;         /* per row, filled cells before each
				     * common (rows x (commons + 1)) */
	/* The title block's scale for the current sheet ("as shown", "10:1")
	 * when not the overview's; reset by proof_begin_sheet. */
	const char *sheet_scale;
};

/* --- paper, text and primitives (proof.c) ------------------------------ */
#define PROOF_MARGIN 10.0        /* paper edge to the frame */
/* Title block: ISO 7200's width, 180 mm (from memory); four rows. */
#define PROOF_TITLE_W 180.0
#define PROOF_TITLE_H 44.0
#define PROOF_TEXT 2.5           /* ordinary text height, mm */
/* Lettering by capital height h, ISO 3098-0's series 2.5, 3.5, 5, 7 mm
 * (from memory); 2.5 mm is the least on any sheet. */
#define PROOF_LETTER 2.5
#define PROOF_LETTER_TITLE 3.5
#define PROOF_LETTER_SHEET 5.0
/* A word's box as PDF readers take it (Liberation Sans: ascent 0.905 em,
 * descent 0.212 em, its hhea table). */
#define PROOF_ASCENT 0.905
#define PROOF_DESCENT 0.212
#define PROOF_BOX (PROOF_ASCENT + PROOF_DESCENT)
/* Baseline of the sheet title; things below it start at PROOF_TOP. */
#define PROOF_SHEET_TITLE_Y (PROOF_MARGIN + 3 + 7.0)
#define PROOF_TOP (PROOF_MARGIN + 14.0)

enum proof_align { ALIGN_LEFT, ALIGN_CENTRE, ALIGN_RIGHT };

void proof_set_colour(struct proof *p, struct rgb c, double alpha);
void proof_font(struct proof *p, double size, bool bold);
void proof_font_mono(struct proof *p, double size);
/* Lettering by capital height (mm), through the face's own cap height. */
void proof_letter(struct proof *p, double cap, bool bold);
void proof_letter_mono(struct proof *p, double cap);
double proof_em(double cap, bool bold);
/* Baseline to baseline for lines of lettering cap high. */
double proof_line_pitch(double cap);
bool proof_fonts_ready(void);
/* Wraps text into width from baseline y; returns the next baseline. */
double proof_paragraph(struct proof *p, double x, double y, double width,
		       double cap, const char *text);
/* The height proof_paragraph would take, from the first line's box top. */
double proof_paragraph_height(struct proof *p, double width, double cap,
			      const char *text);
/* Text with its baseline at y. */
void proof_text(struct proof *p, double x, double y, enum proof_align align,
		const char *text);
void proof_textf(struct proof *p, double x, double y, enum proof_align align,
		 const char *format, ...) __attribute__((format(printf, 5, 6)));
double proof_text_width(struct proof *p, const char *text);
void proof_line(struct proof *p, double x0, double y0, double x1, double y1,
		double width);
/* Starts a sheet: frame, title block; ends with proof_end_sheet. */
void proof_begin_sheet(struct proof *p, const char *title);
void proof_end_sheet(struct proof *p);
/* Where notes go (cautions, what a design lacks): x, first baseline,
 * width. */
void proof_note_area(const struct proof *p, double *x, double *y,
		     double *w);
double proof_area_bottom(const struct gp_proof_plan *plan);
/* Text cut with an ellipsis to width. */
void proof_text_fitted(struct proof *p, double x, double y, double width,
		       const char *text);
/* The drawing area of a sheet inside the frame, above the title band. */
void proof_area(const struct proof *p, double *x0, double *y0, double *x1,
		double *y1);
void proof_legend(struct proof *p, const struct proof_legend_item *items,
		  int count);
/* "1.25" from nanometres, trailing zeros dropped. */
void proof_mm(char *buffer, size_t size, int64_t nm);

static inline double proof_x(const struct proof_view *v, int64_t x)
{
	return v->ox + v->s * (double)x / 1e6;
}
static inline double proof_y(const struct proof_view *v, int64_t y)
{
	return v->oy - v->s * (double)y / 1e6;
}

/* --- artwork (proof-draw.c) -------------------------------------------- */
/* Adds every filled shape of layer (roles in role_mask, 1 << role) to the
 * current path, rings oriented for the non-zero rule; returns the count. */
size_t proof_path_layer(struct proof *p, const struct proof_view *v,
			enum gp_layer layer, unsigned role_mask);
void proof_fill_layer(struct proof *p, const struct proof_view *v,
		      enum gp_layer layer, unsigned role_mask, struct rgb c,
		      double alpha);
/* Paints a whole layer (all roles) at the overview's view in its own
 * colour with alpha. */
void proof_paint_layer(struct proof *p, enum gp_layer layer, double alpha);
void proof_layers_destroy(struct proof *p);
/* Strokes the line shapes (outlines) of layer. */
void proof_stroke_lines(struct proof *p, const struct proof_view *v,
			enum gp_layer layer, double width);
void proof_plate_outlines(struct proof *p, const struct proof_view *v,
			  bool front, bool back);
void proof_viewing_area(struct proof *p, const struct proof_view *v);
void proof_add_polygon(struct proof *p, const struct proof_view *v,
		       const struct gp_polygon *poly);
void proof_add_box(struct proof *p, const struct proof_view *v,
		   struct gp_box box);
bool proof_has_layer(const struct proof *p, enum gp_layer layer,
		     unsigned role_mask);
bool proof_has_role(const struct proof *p, enum gp_role role);
/* Intended pixels: all on, or a checkerboard over the matrix blocks. */
void proof_pixels(struct proof *p, const struct proof_view *v,
		  bool checkerboard);
bool proof_cells_create(struct proof *p);
void proof_cells_destroy(struct proof *p);
void proof_pin1(struct proof *p, const struct proof_view *v);

void proof_sheet_overview(struct proof *p);
void proof_sheet_layers(struct proof *p);
void proof_sheet_lit(struct proof *p, bool checkerboard);
void proof_sheet_show(struct proof *p);

/* --- placing dimensions (proof-place.c) --------------------------------- */
/* Paper rectangle, mm, y down. */
struct proof_rect {
	double x0, y0, x1, y1;
};

/* What is on a view already: texts, dimension lines (with their arrows)
 * and extension lines, in the view's own frame. */
struct proof_space {
	struct proof_rect *texts, *lines, *exts;
	size_t text_count, text_capacity;
	size_t line_count, line_capacity;
	size_t ext_count, ext_capacity;
	bool failed;
};

enum proof_side { SIDE_TOP, SIDE_BOTTOM, SIDE_LEFT, SIDE_RIGHT, SIDE_COUNT };

/* A view's frame: glass box (glass frame) drawn at scale with ox = oy = 0:
 * paper x = scale * x_mm, paper y = -scale * y_mm; x0..y1 the box on
 * paper. */
struct proof_frame {
	struct gp_box glass;
	double scale;
	double x0, y0, x1, y1;
};

#define PROOF_FIRST_TIER 7.0  /* glass edge to the first dimension line */
#define PROOF_TIER 6.5        /* between dimension lines */

/* One dimension in the glass frame: along x for top and bottom (a, b are
 * x), along y for left and right (a, b are y); extension lines from the
 * features (y, or x) when given, else from the glass edge. */
struct proof_dim {
	enum proof_side side;
	int order;                /* lower orders are placed first, nearer */
	int64_t a, b;
	bool has_feature_a, has_feature_b;
	int64_t feature_a, feature_b;
	char label[64];           /* "viewing area ", may be empty */
	char value[72];           /* "56", "47.25 +-0.02", "(3.15)" */
	/* placed */
	bool placed;
	int tier, where;          /* where: 0 between arrows, 1 after, 2 before */
	double text_width;
};

void proof_space_init(struct proof_space *s);
void proof_space_finish(struct proof_space *s);
void proof_space_add_text(struct proof_space *s, struct proof_rect r);
void proof_frame_init(struct proof_frame *f, struct gp_box glass,
		      double scale);
void proof_rv_point(const struct proof_frame *f, enum proof_side side,
		    double r, double v, double *x, double *y);
void proof_place_dims(struct proof *p, struct proof_space *s,
		      const struct proof_frame *f, struct proof_dim *dims,
		      size_t count);
/* How far the placed things reach beyond the glass box on each side. */
void proof_space_room(const struct proof_space *s,
		      const struct proof_frame *f, double room[SIDE_COUNT]);
void proof_draw_dims(struct proof *p, const struct proof_space *s,
		     const struct proof_frame *f,
		     const struct proof_dim *dims, size_t count);
/* A length as a drawing states it: exact to four decimals, else to three. */
void proof_dim_mm(char *buffer, size_t size, int64_t nm);

/* --- dimensions and details (proof-dims.c) ----------------------------- */
void proof_overview_dims(struct proof *p);
void proof_ruler(struct proof *p);
void proof_sheets_details(struct proof *p);
int proof_detail_sheet_count(struct proof *p);
/* How much room the overview's dimensions need on each side (mm) at
 * scale. */
void proof_overview_room(struct proof *p, double scale,
			 double room[SIDE_COUNT]);
double proof_overview_note_height(struct proof *p, double width);
void proof_pin_labels(struct proof *p);

/* --- tables (proof-tables.c) ------------------------------------------- */
int proof_pin_sheet_count(struct proof *p);
void proof_sheets_pins(struct proof *p);
void proof_sheets_spec(struct proof *p);
int proof_spec_sheet_count(const struct gp_build *build,
			   const struct gp_proof_plan *plan);
int proof_finding_sheet_count(const struct gp_build *build,
			      const struct gp_proof_plan *plan);
void proof_sheets_findings(struct proof *p);
void proof_cautions(struct proof *p);
bool proof_net_use_create(struct proof *p);
bool proof_pins_create(struct proof *p);
void proof_pins_destroy(struct proof *p);
/* What a net drives (gp_net_drives) and its pixel count:
 * "block main line 1 row 3 (80 pixels)". */
void proof_net_drives(const struct proof *p, int net, char *buffer,
		      size_t size);

#endif
