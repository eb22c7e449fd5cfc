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

/* One block's dots as cairo recording surfaces, each covering one cell
 * (origin at the cell's top-left dot corner, paper mm at the view scale):
 * all dots, and the two halves of a dot checkerboard. */
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
};

/* --- paper, text and primitives (proof.c) ------------------------------ */
#define PROOF_MARGIN 10.0        /* paper edge to the frame */
#define PROOF_TITLE_W 120.0      /* title block */
#define PROOF_TITLE_H 34.0
#define PROOF_RULER_BAND 16.0    /* above the title band, overview only */
#define PROOF_TEXT 2.5           /* ordinary text height, mm */

enum proof_align { ALIGN_LEFT, ALIGN_CENTRE, ALIGN_RIGHT };

void proof_set_colour(struct proof *p, struct rgb c, double alpha);
void proof_font(struct proof *p, double size, bool bold);
void proof_font_mono(struct proof *p, double size);
/* Text with its baseline at y; returns its width in mm. */
double proof_text(struct proof *p, double x, double y, enum proof_align align,
		  const char *text);
double proof_textf(struct proof *p, double x, double y,
		   enum proof_align align, const char *format, ...)
	__attribute__((format(printf, 5, 6)));
double proof_text_width(struct proof *p, const char *text);
void proof_line(struct proof *p, double x0, double y0, double x1, double y1,
		double width);
/* Starts a sheet: frame, title block; ends with proof_end_sheet. */
void proof_begin_sheet(struct proof *p, const char *title);
void proof_end_sheet(struct proof *p);
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

/* --- dimensions and details (proof-dims.c) ----------------------------- */
void proof_overview_dims(struct proof *p);
void proof_ruler(struct proof *p);
void proof_sheets_details(struct proof *p);
int proof_detail_sheet_count(const struct gp_build *build,
			     const struct gp_proof_plan *plan);
/* How much room the overview's dimensions need on each side (mm). */
void proof_dim_room(const struct gp_build *build, double *left,
		    double *right, double *top, double *bottom);

/* --- tables (proof-tables.c) ------------------------------------------- */
int proof_pin_sheet_count(const struct gp_build *build,
			  const struct gp_proof_plan *plan);
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
