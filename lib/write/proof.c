/* The PDF proof: the sheet plan, the frame and title block, text
 * primitives, and the document itself. */
#include "proof-internal.h"

#include "font.h"
#include "gerber.h"
#include "units.h"

#include "gp-config.h"

#include <cairo-ft.h>
#include <cairo-pdf.h>
#include <ft2build.h>
#include FT_FREETYPE_H
#include <pthread.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define PT_PER_MM (72.0 / 25.4)

/* Colours: blue, orange and bluish green from Okabe and Ito's palette for
 * colour-blind readers ("Color Universal Design", 2008, from memory), a
 * dark violet and a red of our own; test-proof checks every pair as
 * protanopes and deuteranopes see them. */
#define FRONT_RGB { 0.0, 0.447, 0.698 }
#define BACK_RGB { 0.902, 0.624, 0.0 }
#define SEAL_RGB { 0.0, 0.620, 0.451 }
#define TRANSFER_RGB { 0.35, 0.20, 0.55 }
#define BLACK_RGB { 0.0, 0.0, 0.0 }
const struct rgb proof_front_colour = FRONT_RGB;
const struct rgb proof_back_colour = BACK_RGB;
const struct rgb proof_seal_colour = SEAL_RGB;
const struct rgb proof_transfer_colour = TRANSFER_RGB;
const struct rgb proof_dim_colour = BLACK_RGB;
const struct rgb proof_finding_colour = { 0.85, 0.0, 0.05 };
const struct rgb proof_viewing_colour = BLACK_RGB;

const struct proof_legend_item proof_overview_legend[] = {
	{ "front plate ITO", FRONT_RGB, 0.5, SWATCH_FILL },
	{ "back plate ITO", BACK_RGB, 0.5, SWATCH_FILL },
	{ "seal", SEAL_RGB, 0.45, SWATCH_FILL },
	{ "common transfer", TRANSFER_RGB, 1.0, SWATCH_FILL },
	{ "viewing area", BLACK_RGB, 1.0, SWATCH_DASH_DOT },
	{ "front outline", BLACK_RGB, 1.0, SWATCH_SOLID },
	{ "back outline", BLACK_RGB, 1.0, SWATCH_DASHED },
};
const int proof_overview_legend_count =
	sizeof(proof_overview_legend) / sizeof(proof_overview_legend[0]);

/* Reduction scales recommended by ISO 5455 (from memory), tried in turn
 * when the glass does not fit at 1:1. */
static const int reductions[] = { 1, 2, 5, 10, 20, 50, 100 };

/* --- the plan ------------------------------------------------------------ */

static struct gp_box glass_box(const struct gp_design *d)
{
	return gp_box_union(d->front.box, d->back.box);
}

/* Inner size (inside the frame) the overview needs at scale s. */
static void overview_need(const struct gp_build *build, double s, double *w,
			  double *h)
{
	double left, right, top, bottom;
	proof_dim_room(build, &left, &right, &top, &bottom);
	struct gp_box g = glass_box(build->design);
	*w = left + right + s * gp_mm(gp_box_width(g));
	*h = top + bottom + s * gp_mm(gp_box_height(g)) + PROOF_RULER_BAND +
	     PROOF_TITLE_H;
	/* the title block, a legend beside it, and the ruler */
	double least = PROOF_TITLE_W + 60;
	if (*w < least)
		*w = least;
}

static bool fits(const struct gp_paper *paper, bool landscape, double w,
		 double h)
{
	double pw = landscape ? paper->h : paper->w;
	double ph = landscape ? paper->w : paper->h;
	return w + 2 * PROOF_MARGIN <= pw && h + 2 * PROOF_MARGIN <= ph;
}

/* Tries the candidate papers smallest first; the orientation that suits
 * the glass's shape first. */
static bool choose_paper(const struct gp_build *build, double s,
			 struct gp_proof_plan *plan)
{
	const struct gp_proof_spec *spec = &build->design->proof;
	double w, h;
	overview_need(build, s, &w, &h);
	bool wide = w >= h;
	for (size_t i = 0; i < GP_PAPER_COUNT; i++) {
		const struct gp_paper *paper = &gp_papers[i];
		if (spec->paper ? (size_t)spec->paper != i + 1
				: paper->series != spec->series)
			continue;
		for (int k = 0; k < 2; k++) {
			bool landscape = k == 0 ? wide : !wide;
			if (spec->orientation &&
			    landscape != (spec->orientation == 2))
				continue;
			if (!fits(paper, landscape, w, h))
				continue;
			plan->paper_name = paper->name;
			plan->landscape = landscape;
			plan->paper_w = landscape ? paper->h : paper->w;
			plan->paper_h = landscape ? paper->w : paper->h;
			return true;
		}
	}
	return false;
}

/* The largest paper allowed, for glass too large for any scale tried. */
static void largest_paper(const struct gp_build *build,
			  struct gp_proof_plan *plan)
{
	const struct gp_proof_spec *spec = &build->design->proof;
	const struct gp_paper *paper = NULL;
	for (size_t i = 0; i < GP_PAPER_COUNT; i++)
		if (spec->paper ? (size_t)spec->paper == i + 1
				: gp_papers[i].series == spec->series)
			paper = &gp_papers[i];
	plan->landscape = spec->orientation != 1;
	plan->paper_name = paper->name;
	plan->paper_w = plan->landscape ? paper->h : paper->w;
	plan->paper_h = plan->landscape ? paper->w : paper->h;
}

void gp_proof_plan(const struct gp_build *build, struct gp_proof_plan *plan)
{
	memset(plan, 0, sizeof(*plan));
	size_t n = sizeof(reductions) / sizeof(reductions[0]);
	size_t k = 0;
	while (k < n && !choose_paper(build, 1.0 / reductions[k], plan))
		k++;
	if (k == n) {
		k = n - 1;
		largest_paper(build, plan);
	}
	plan->scale_num = 1;
	plan->scale_den = reductions[k];
	plan->scale = 1.0 / reductions[k];

	/* the glass centred in what the dimensions leave */
	double left, right, top, bottom;
	proof_dim_room(build, &left, &right, &top, &bottom);
	struct gp_box g = glass_box(build->design);
	double x0 = PROOF_MARGIN + left;
	double x1 = plan->paper_w - PROOF_MARGIN - right;
	double y0 = PROOF_MARGIN + top;
	double y1 = plan->paper_h - PROOF_MARGIN - PROOF_TITLE_H -
		    PROOF_RULER_BAND - bottom;
	double gw = plan->scale * gp_mm(gp_box_width(g));
	double gh = plan->scale * gp_mm(gp_box_height(g));
	plan->ox = (x0 + x1 - gw) / 2 - plan->scale * gp_mm(g.x0);
	plan->oy = (y0 + y1 - gh) / 2 + plan->scale * gp_mm(g.y1);
	plan->ruler_x = PROOF_MARGIN + 8;
	plan->ruler_y = plan->paper_h - PROOF_MARGIN - PROOF_TITLE_H - 5;

	int sheet = 1;
	plan->sheet_overview = sheet++;
	sheet += 4;               /* front ITO, back ITO, seal, outlines */
	plan->detail_sheets = proof_detail_sheet_count(build, plan);
	plan->sheet_details = sheet;
	sheet += plan->detail_sheets;
	plan->finding_sheets = proof_finding_sheet_count(build, plan);
	plan->sheet_findings = sheet;
	sheet += plan->finding_sheets;
	plan->pin_sheets = proof_pin_sheet_count(build, plan);
	plan->sheet_pins = sheet;
	sheet += plan->pin_sheets;
	plan->spec_sheets = proof_spec_sheet_count(build, plan);
	plan->sheet_spec = sheet;
	sheet += plan->spec_sheets;
	plan->sheet_lit = sheet;
	sheet += 2;
	plan->sheet_count = sheet - 1;
}

/* --- primitives ----------------------------------------------------------- */

void proof_mm(char *buffer, size_t size, int64_t nm)
{
	gp_format_mm_short(buffer, size, nm);
}

void proof_set_colour(struct proof *p, struct rgb c, double alpha)
{
	if (alpha >= 1.0)
		cairo_set_source_rgb(p->cr, c.r, c.g, c.b);
	else
		cairo_set_source_rgba(p->cr, c.r, c.g, c.b, alpha);
}

/* The proof's faces, opened once per process and kept: cairo keeps
 * font faces in caches of its own beyond any one document, so they must
 * outlive every surface.  Found through fontconfig by our font module
 * (cairo 1.16's own fontconfig lookup for toy fonts leaks patterns).
 * Only the family the project installs and tests (.ci/install-deps:
 * fonts-liberation2). */
static const char *const font_names[3] = {
	"Liberation Sans",
	"Liberation Sans:bold",
	"Liberation Mono",
};

static struct {
	pthread_once_t once;
	FT_Library library;
	cairo_font_face_t *faces[3];
	bool ok;
} fonts = { .once = PTHREAD_ONCE_INIT };

static void done_face(void *face)
{
	FT_Done_Face(face);
}

static cairo_font_face_t *open_face(int kind)
{
	static const cairo_user_data_key_t key;
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = gp_font_open(font_names[kind], NULL, NULL,
					    &diag);
	gp_diag_finish(&diag);
	FT_Face face = NULL;
	bool ok = font && FT_New_Face(fonts.library, gp_font_file(font),
				      gp_font_face_index(font), &face) == 0;
	gp_font_destroy(font);
	if (!ok)
		return NULL;
	cairo_font_face_t *cf =
		cairo_ft_font_face_create_for_ft_face(face, FT_LOAD_NO_HINTING);
	if (cairo_font_face_set_user_data(cf, &key, face, done_face)) {
		cairo_font_face_destroy(cf);
		FT_Done_Face(face);
		return NULL;
	}
	return cf;
}

static void open_fonts(void)
{
	if (FT_Init_FreeType(&fonts.library))
		return;
	fonts.faces[0] = open_face(0);
	fonts.faces[1] = open_face(1);
	fonts.faces[2] = open_face(2);
	fonts.ok = fonts.faces[0] && fonts.faces[1] && fonts.faces[2];
}

static bool have_fonts(void)
{
	pthread_once(&fonts.once, open_fonts);
	return fonts.ok;
}

cairo_font_face_t *gp_proof_text_face(void)
{
	return have_fonts() ? fonts.faces[0] : NULL;
}

void proof_font(struct proof *p, double size, bool bold)
{
	cairo_set_font_face(p->cr, fonts.faces[bold]);
	cairo_set_font_size(p->cr, size);
}

void proof_font_mono(struct proof *p, double size)
{
	cairo_set_font_face(p->cr, fonts.faces[2]);
	cairo_set_font_size(p->cr, size);
}

double proof_text_width(struct proof *p, const char *text)
{
	cairo_text_extents_t e;
	cairo_text_extents(p->cr, text, &e);
	return e.x_advance;
}

double proof_text(struct proof *p, double x, double y, enum proof_align align,
		  const char *text)
{
	double w = proof_text_width(p, text);
	if (align == ALIGN_CENTRE)
		x -= w / 2;
	else if (align == ALIGN_RIGHT)
		x -= w;
	cairo_move_to(p->cr, x, y);
	cairo_show_text(p->cr, text);
	cairo_new_path(p->cr);
	return w;
}

double proof_textf(struct proof *p, double x, double y,
		   enum proof_align align, const char *format, ...)
{
	char text[512];
	va_list args;
	va_start(args, format);
	vsnprintf(text, sizeof(text), format, args);
	va_end(args);
	return proof_text(p, x, y, align, text);
}

void proof_line(struct proof *p, double x0, double y0, double x1, double y1,
		double width)
{
	cairo_set_line_width(p->cr, width);
	cairo_move_to(p->cr, x0, y0);
	cairo_line_to(p->cr, x1, y1);
	cairo_stroke(p->cr);
}

void proof_area(const struct proof *p, double *x0, double *y0, double *x1,
		double *y1)
{
	*x0 = PROOF_MARGIN + 4;
	*y0 = PROOF_MARGIN + 4;
	*x1 = p->plan.paper_w - PROOF_MARGIN - 4;
	*y1 = p->plan.paper_h - PROOF_MARGIN - PROOF_TITLE_H - 4;
}

/* --- frame and title block --------------------------------------------------- */

static void title_cell(struct proof *p, double x, double y, double w,
		       double h, const char *label, const char *value,
		       double size, bool bold)
{
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	cairo_set_line_width(p->cr, 0.25);
	cairo_rectangle(p->cr, x, y, w, h);
	cairo_stroke(p->cr);
	proof_font(p, 1.8, false);
	proof_text(p, x + 1.2, y + 2.6, ALIGN_LEFT, label);
	proof_font(p, size, bold);
	/* shrink long values into the cell */
	double tw = proof_text_width(p, value);
	if (tw > w - 2.4)
		proof_font(p, size * (w - 2.4) / tw, bold);
	proof_text(p, x + 1.2, y + h - 1.6, ALIGN_LEFT, value);
}

static void glass_thickness(const struct proof *p, char *buffer, size_t size)
{
	const struct gp_drive_spec *d = &p->design->drive;
	char mm[32];
	if (!d->has_thickness) {
		snprintf(buffer, size, "not given");
		return;
	}
	proof_mm(mm, sizeof(mm), d->glass_thickness);
	snprintf(buffer, size, "%s mm", mm);
}

/* As written in the description, else the build's date (from
 * SOURCE_DATE_EPOCH), else none. */
static void revision_date(const struct proof *p, char *buffer, size_t size)
{
	char day[32];
	const char *date = p->design->proof.revision_date;
	if (!date)
		date = gp_build_date(p->build, day, sizeof(day));
	snprintf(buffer, size, "%s", date ? date : "not given");
}

static void title_block(struct proof *p, const char *title)
{
	const struct gp_design *d = p->design;
	double w = PROOF_TITLE_W, h = PROOF_TITLE_H / 4;
	double x = p->plan.paper_w - PROOF_MARGIN - w;
	double y = p->plan.paper_h - PROOF_MARGIN - PROOF_TITLE_H;
	char a[64], b[64], c[64];

	title_cell(p, x, y, 45, h, "Part number", d->part, 3.5, true);
	title_cell(p, x + 45, y, w - 45, h, "Title", d->title, 2.5, false);
	y += h;
	revision_date(p, b, sizeof(b));
	title_cell(p, x, y, 30, h, "Revision", d->revision, 3.0, true);
	title_cell(p, x + 30, y, 45, h, "Revision date", b, 2.5, false);
	title_cell(p, x + 75, y, w - 75, h, "Units", "mm", 2.5, false);
	y += h;
	snprintf(a, sizeof(a), "%d:%d", p->plan.scale_num,
		 p->plan.scale_den);
	glass_thickness(p, c, sizeof(c));
	snprintf(b, sizeof(b), "%s %s", p->plan.paper_name,
		 p->plan.landscape ? "landscape" : "portrait");
	title_cell(p, x, y, 30, h, "Scale", a, 3.0, true);
	title_cell(p, x + 30, y, 45, h, "Glass thickness", c, 2.5, false);
	title_cell(p, x + 75, y, w - 75, h, "Paper", b, 2.5, false);
	y += h;
	snprintf(a, sizeof(a), "%d of %d", p->sheet, p->plan.sheet_count);
	snprintf(b, sizeof(b), "glassplot %s", GP_VERSION);
	title_cell(p, x, y, 30, h, "Sheet", a, 3.0, true);
	title_cell(p, x + 30, y, 65, h, "Sheet title", title, 2.5, false);
	title_cell(p, x + 95, y, w - 95, h, "Drawn by", b, 2.0, false);
}

void proof_begin_sheet(struct proof *p, const char *title)
{
	cairo_t *cr = p->cr;
	cairo_save(cr);
	cairo_scale(cr, PT_PER_MM, PT_PER_MM);
	cairo_set_source_rgb(cr, 0, 0, 0);
	cairo_set_line_width(cr, 0.5);
	cairo_rectangle(cr, PROOF_MARGIN, PROOF_MARGIN,
			p->plan.paper_w - 2 * PROOF_MARGIN,
			p->plan.paper_h - 2 * PROOF_MARGIN);
	cairo_stroke(cr);
	title_block(p, title);
	cairo_set_source_rgb(cr, 0, 0, 0);
	proof_font(p, 4.0, true);
	proof_text(p, PROOF_MARGIN + 4, PROOF_MARGIN + 7, ALIGN_LEFT, title);
}

void proof_end_sheet(struct proof *p)
{
	cairo_restore(p->cr);
	cairo_show_page(p->cr);
	p->sheet++;
}

static void swatch(struct proof *p, double x, double y,
		   const struct proof_legend_item *item)
{
	cairo_t *cr = p->cr;
	if (item->swatch == SWATCH_FILL) {
		proof_set_colour(p, item->colour, item->alpha);
		cairo_rectangle(cr, x, y, 8, 4);
		cairo_fill(cr);
		cairo_set_source_rgb(cr, 0, 0, 0);
		cairo_set_line_width(cr, 0.15);
		cairo_rectangle(cr, x, y, 8, 4);
		cairo_stroke(cr);
		return;
	}
	static const double dashed[] = { 3.0, 1.5 };
	static const double dash_dot[] = { 4.0, 1.0, 0.8, 1.0 };
	if (item->swatch == SWATCH_DASHED)
		cairo_set_dash(cr, dashed, 2, 0);
	else if (item->swatch == SWATCH_DASH_DOT)
		cairo_set_dash(cr, dash_dot, 4, 0);
	proof_set_colour(p, item->colour, item->alpha);
	proof_line(p, x, y + 2, x + 8, y + 2, 0.3);
	cairo_set_dash(cr, NULL, 0, 0);
}

void proof_legend(struct proof *p, const struct proof_legend_item *items,
		  int count)
{
	double x = PROOF_MARGIN + 4;
	double y = p->plan.paper_h - PROOF_MARGIN - PROOF_TITLE_H + 2;
	double column = (p->plan.paper_w - 2 * PROOF_MARGIN - PROOF_TITLE_W -
			 8) / 2;
	if (column > 70)
		column = 70;
	proof_font(p, PROOF_TEXT, false);
	for (int i = 0; i < count; i++) {
		double cx = x + (i % 2) * column, cy = y + (i / 2) * 6.0;
		swatch(p, cx, cy, &items[i]);
		cairo_set_source_rgb(p->cr, 0, 0, 0);
		proof_text(p, cx + 10, cy + 3.3, ALIGN_LEFT, items[i].label);
	}
}

/* --- the document -------------------------------------------------------- */

static cairo_status_t write_chunk(void *closure, const unsigned char *data,
				  unsigned int length)
{
	struct gp_buffer *out = closure;
	return gp_buffer_append(out, data, length) ? CAIRO_STATUS_SUCCESS
						   : CAIRO_STATUS_WRITE_ERROR;
}

/* Title, author, creator; the creation date only from SOURCE_DATE_EPOCH.
 * cairo 1.16 dates a document with the wall clock unless the date is set;
 * an empty date makes it write none.  (It also writes the date without
 * the "D:" prefix; poppler reads it either way.) */
static void set_metadata(cairo_surface_t *surface,
			 const struct gp_build *build)
{
	const struct gp_design *d = build->design;
	char title[256], date[32] = "";
	snprintf(title, sizeof(title), "%s revision %s: proof", d->part,
		 d->revision);
	cairo_pdf_surface_set_metadata(surface, CAIRO_PDF_METADATA_TITLE,
				       title);
	cairo_pdf_surface_set_metadata(surface, CAIRO_PDF_METADATA_AUTHOR,
				       "glassplot");
	cairo_pdf_surface_set_metadata(surface, CAIRO_PDF_METADATA_CREATOR,
				       "glassplot " GP_VERSION);
	if (build->has_epoch &&
	    !gp_gerber_format_date(date, sizeof(date), build->epoch))
		date[0] = '\0';
	cairo_pdf_surface_set_metadata(surface, CAIRO_PDF_METADATA_CREATE_DATE,
				       date);
}

static void draw_sheets(struct proof *p)
{
	proof_sheet_overview(p);
	proof_sheet_layers(p);
	proof_sheets_details(p);
	proof_sheets_findings(p);
	proof_sheets_pins(p);
	proof_sheets_spec(p);
	proof_sheet_lit(p, false);
	proof_sheet_lit(p, true);
}

static void proof_finish(struct proof *p)
{
	proof_cells_destroy(p);
	proof_layers_destroy(p);
	proof_pins_destroy(p);
	free(p->use);
	free(p->pin_order);
}

bool gp_proof_write(struct gp_buffer *out, const struct gp_build *build,
		    struct gp_diag *diag)
{
	struct proof p;
	memset(&p, 0, sizeof(p));
	p.build = build;
	p.design = build->design;
	p.art = &build->art;
	p.sheet = 1;
	gp_proof_plan(build, &p.plan);
	p.view = (struct proof_view){ .ox = p.plan.ox, .oy = p.plan.oy,
				      .s = p.plan.scale };

	if (!have_fonts())
		return gp_diag_error(diag, NULL, "proof.pdf: cannot open the "
				     "fonts '%s', '%s' and '%s' (install the "
				     "Liberation fonts, version 2)",
				     font_names[0], font_names[1],
				     font_names[2]);
	bool ok = false;
	cairo_surface_t *surface = cairo_pdf_surface_create_for_stream(
		write_chunk, out, p.plan.paper_w * PT_PER_MM,
		p.plan.paper_h * PT_PER_MM);
	cairo_pdf_surface_restrict_to_version(surface, CAIRO_PDF_VERSION_1_5);
	set_metadata(surface, build);
	p.cr = cairo_create(surface);
	if (!proof_net_use_create(&p) || !proof_cells_create(&p) ||
	    !proof_pins_create(&p)) {
		gp_diag_error(diag, NULL, "proof.pdf: out of memory");
		goto cleanup;
	}
	draw_sheets(&p);
	cairo_status_t status = cairo_status(p.cr);
	cairo_destroy(p.cr);
	p.cr = NULL;
	cairo_surface_finish(surface);
	if (status == CAIRO_STATUS_SUCCESS)
		status = cairo_surface_status(surface);
	if (status != CAIRO_STATUS_SUCCESS || out->failed) {
		gp_diag_error(diag, NULL, "proof.pdf: cairo failed: %s",
			      cairo_status_to_string(status));
		goto cleanup;
	}
	ok = p.sheet - 1 == p.plan.sheet_count ||
	     gp_diag_error(diag, NULL, "proof.pdf: drew %d sheets, planned "
			   "%d (a bug)", p.sheet - 1, p.plan.sheet_count);
cleanup:
	if (p.cr)
		cairo_destroy(p.cr);
	cairo_surface_destroy(surface);
	proof_finish(&p);
	return ok;
}
