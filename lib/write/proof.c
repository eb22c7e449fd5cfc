/* The PDF proof: the sheet plan, the frame and title
 * block, text primitives, and the document itself. */
#include "proof-internal.h"

#include "font.h"
#include "gerber.h"
#include "units.h"

#include "gp-config.h"

#include <cairo-ft.h>
#include <cairo-pdf.h>
#include <ft2build.h>
#include FT_FREETYPE_H
#include FT_TRUETYPE_TABLES_H
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

static bool have_fonts(void);

/* --- the plan ------------------------------------------------------------ */

static struct gp_box glass_box(const struct gp_design *d)
{
	return gp_box_union(d->front.box, d->back.box);
}

/* The band above the title block on the overview: the 100 mm ruler and
 * the legend beside it, in as many columns as the width holds. */
#define RULER_BLOCK 18.0
#define LEGEND_ROW 5.5

static void foot_band(struct proof *p, double paper_w,
		      struct gp_proof_plan *plan)
{
	proof_letter(p, PROOF_LETTER, false);
	double widest = 0;
	for (int i = 0; i < proof_overview_legend_count; i++) {
		double w = proof_text_width(p, proof_overview_legend[i].label);
		if (w > widest)
			widest = w;
	}
	double column = 10 + widest + 5;
	double room = paper_w - 2 * PROOF_MARGIN - 8 -
		      (GP_PROOF_RULER_MM + 12);
	int columns = (int)(room / column);
	if (columns < 1)
		columns = 1;
	int rows = (proof_overview_legend_count + columns - 1) / columns;
	plan->legend_columns = columns;
	plan->legend_column_w = column;
	double legend_h = rows * LEGEND_ROW;
	plan->foot_h = (legend_h > RULER_BLOCK ? legend_h : RULER_BLOCK) + 2;
}

/* Inner size (inside the frame) the overview needs at scale s on paper
 * paper_w wide; room is the dimensions' room at that scale. */
static void overview_need(struct proof *p, const double room[SIDE_COUNT],
			  double s, double paper_w, struct gp_proof_plan *plan,
			  double *w, double *h)
{
	struct gp_box g = glass_box(p->design);
	foot_band(p, paper_w, plan);
	plan->note_h = proof_overview_note_height(
		p, paper_w - 2 * PROOF_MARGIN - 8);
	*w = room[SIDE_LEFT] + room[SIDE_RIGHT] + s * gp_mm(gp_box_width(g)) +
	     8;
	*h = (PROOF_TOP - PROOF_MARGIN) + plan->note_h + room[SIDE_TOP] +
	     room[SIDE_BOTTOM] + s * gp_mm(gp_box_height(g)) + plan->foot_h +
	     PROOF_TITLE_H + 4;
	if (*w < PROOF_TITLE_W)
		*w = PROOF_TITLE_W;
}

static bool fits(double pw, double ph, double w, double h)
{
	return w + 2 * PROOF_MARGIN <= pw && h + 2 * PROOF_MARGIN <= ph;
}

static void take_paper(const struct gp_paper *paper, bool landscape,
		       struct gp_proof_plan *plan)
{
	plan->paper_name = paper->name;
	plan->landscape = landscape;
	plan->paper_w = landscape ? paper->h : paper->w;
	plan->paper_h = landscape ? paper->w : paper->h;
}

/* Tries the candidate papers smallest first; the orientation that suits
 * the glass's shape first. */
static bool choose_paper(struct proof *p, double s,
			 struct gp_proof_plan *plan)
{
	const struct gp_proof_spec *spec = &p->design->proof;
	double room[SIDE_COUNT];
	proof_overview_room(p, s, room);
	struct gp_box g = glass_box(p->design);
	bool wide = gp_box_width(g) >= gp_box_height(g);
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
			double pw = landscape ? paper->h : paper->w;
			double ph = landscape ? paper->w : paper->h;
			double w, h;
			overview_need(p, room, s, pw, plan, &w, &h);
			if (!fits(pw, ph, w, h))
				continue;
			take_paper(paper, landscape, plan);
			return true;
		}
	}
	return false;
}

/* The largest paper allowed, for glass too large for any scale tried. */
static void largest_paper(struct proof *p, struct gp_proof_plan *plan)
{
	const struct gp_proof_spec *spec = &p->design->proof;
	const struct gp_paper *paper = NULL;
	for (size_t i = 0; i < GP_PAPER_COUNT; i++)
		if (spec->paper ? (size_t)spec->paper == i + 1
				: gp_papers[i].series == spec->series)
			paper = &gp_papers[i];
	bool landscape = spec->orientation != 1;
	take_paper(paper, landscape, plan);
	double room[SIDE_COUNT], w, h;
	proof_overview_room(p, plan->scale, room);
	overview_need(p, room, plan->scale, plan->paper_w, plan, &w, &h);
}

static void plan_sheets(struct proof *p, struct gp_proof_plan *plan)
{
	const struct gp_build *build = p->build;
	size_t n = sizeof(reductions) / sizeof(reductions[0]);
	size_t k = 0;
	while (k < n && !choose_paper(p, 1.0 / reductions[k], plan))
		k++;
	if (k == n) {
		k = n - 1;
		plan->scale = 1.0 / reductions[k];
		largest_paper(p, plan);
	}
	plan->scale_num = 1;
	plan->scale_den = reductions[k];
	plan->scale = 1.0 / reductions[k];

	/* the glass centred in what the dimensions leave */
	double room[SIDE_COUNT];
	proof_overview_room(p, plan->scale, room);
	struct gp_box g = glass_box(build->design);
	double x0 = PROOF_MARGIN + 4 + room[SIDE_LEFT];
	double x1 = plan->paper_w - PROOF_MARGIN - 4 - room[SIDE_RIGHT];
	double y0 = PROOF_TOP + plan->note_h + room[SIDE_TOP];
	double y1 = plan->paper_h - PROOF_MARGIN - PROOF_TITLE_H -
		    plan->foot_h - 2 - room[SIDE_BOTTOM];
	double gw = plan->scale * gp_mm(gp_box_width(g));
	double gh = plan->scale * gp_mm(gp_box_height(g));
	plan->ox = (x0 + x1 - gw) / 2 - plan->scale * gp_mm(g.x0);
	plan->oy = (y0 + y1 - gh) / 2 + plan->scale * gp_mm(g.y1);
	double foot = plan->paper_h - PROOF_MARGIN - PROOF_TITLE_H -
		      plan->foot_h;
	plan->ruler_x = PROOF_MARGIN + 6;
	plan->ruler_y = foot + RULER_BLOCK - 4;
	plan->legend_x = plan->ruler_x + GP_PROOF_RULER_MM + 12;
	plan->legend_y = foot + 1;

	int sheet = 1;
	plan->sheet_overview = sheet++;
	sheet += 4;               /* front ITO, back ITO, seal, outlines */
	p->plan = *plan;
	plan->detail_sheets = proof_detail_sheet_count(p);
	plan->sheet_details = sheet;
	sheet += plan->detail_sheets;
	plan->finding_sheets = proof_finding_sheet_count(build, plan);
	plan->sheet_findings = sheet;
	sheet += plan->finding_sheets;
	plan->pin_sheets = proof_pin_sheet_count(p);
	plan->sheet_pins = sheet;
	sheet += plan->pin_sheets;
	plan->spec_sheets = proof_spec_sheet_count(build, plan);
	plan->sheet_spec = sheet;
	sheet += plan->spec_sheets;
	plan->sheet_lit = sheet;
	plan->lit_sheets = (build->design->block_count ? 2 : 1) +
			   (build->show != NULL);
	sheet += plan->lit_sheets;
	plan->sheet_count = sheet - 1;
}

/* Plans with a context for measuring text (a recording surface: text
 * measures the same on any). */
static void plan_measured(struct proof *p, struct gp_proof_plan *plan)
{
	cairo_surface_t *surface =
		cairo_recording_surface_create(CAIRO_CONTENT_COLOR_ALPHA, NULL);
	cairo_t *saved = p->cr;
	p->cr = cairo_create(surface);
	cairo_surface_destroy(surface);
	plan_sheets(p, plan);
	cairo_destroy(p->cr);
	p->cr = saved;
}

/* A plan that holds without fonts (gp_proof_write then says so). */
static void plan_without_fonts(struct gp_proof_plan *plan)
{
	take_paper(&gp_papers[0], true, plan);
	plan->scale = 1;
	plan->scale_num = plan->scale_den = 1;
	plan->sheet_count = 1;
}

static void proof_start(struct proof *p, const struct gp_build *build)
{
	memset(p, 0, sizeof(*p));
	p->build = build;
	p->design = build->design;
	p->art = &build->art;
	p->sheet = 1;
}

void gp_proof_plan(const struct gp_build *build, struct gp_proof_plan *plan)
{
	memset(plan, 0, sizeof(*plan));
	struct proof p;
	proof_start(&p, build);
	if (!have_fonts()) {
		plan_without_fonts(plan);
		return;
	}
	proof_pins_create(&p);
	plan_measured(&p, plan);
	proof_pins_destroy(&p);
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
	double cap[3];            /* cap height per em (OS/2 sCapHeight) */
	bool ok;
} fonts = { .once = PTHREAD_ONCE_INIT };

static void done_face(void *face)
{
	FT_Done_Face(face);
}

static cairo_font_face_t *open_face(int kind)
{
	fonts.cap[kind] = 0.7;
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
	const TT_OS2 *os2 = FT_Get_Sfnt_Table(face, FT_SFNT_OS2);
	if (os2 && os2->version >= 2 && os2->sCapHeight > 0 &&
	    face->units_per_EM)
		fonts.cap[kind] = (double)os2->sCapHeight / face->units_per_EM;
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

double proof_em(double cap, bool bold)
{
	return cap / fonts.cap[bold];
}

void proof_letter(struct proof *p, double cap, bool bold)
{
	proof_font(p, proof_em(cap, bold), bold);
}

void proof_letter_mono(struct proof *p, double cap)
{
	proof_font_mono(p, cap / fonts.cap[2]);
}

double proof_line_pitch(double cap)
{
	return PROOF_BOX * proof_em(cap, false) + 1.0;
}

bool proof_fonts_ready(void)
{
	return have_fonts();
}

/* Fits text into width at the current font: whole, or cut with an
 * ellipsis (never smaller lettering). */
static void fit_text(struct proof *p, const char *text, double width,
		     char *out, size_t size)
{
	snprintf(out, size, "%s", text);
	size_t n = strlen(out);
	while (n > 0 && proof_text_width(p, out) > width) {
		do
			n--;
		while (n > 0 && (out[n] & 0xc0) == 0x80);
		snprintf(out + n, size - n, "\xe2\x80\xa6");
	}
}

/* Lays text out in lines of width; draws them when draw, from baseline
 * y; returns the number of lines. */
static int paragraph(struct proof *p, double x, double y, double width,
		     double cap, const char *text, bool draw)
{
	double pitch = proof_line_pitch(cap);
	char line[1024] = "";
	size_t n = 0;
	int lines = 0;
	const char *word = text;
	while (*word) {
		size_t len = strcspn(word, " ");
		char trial[1024];
		snprintf(trial, sizeof(trial), "%.*s%s%.*s", (int)n, line,
			 n ? " " : "", (int)len, word);
		if (n && proof_text_width(p, trial) > width) {
			if (draw)
				proof_text(p, x, y, ALIGN_LEFT, line);
			y += pitch;
			lines++;
			snprintf(line, sizeof(line), "%.*s", (int)len, word);
		} else {
			snprintf(line, sizeof(line), "%s", trial);
		}
		n = strlen(line);
		word += len;
		while (*word == ' ')
			word++;
	}
	if (n) {
		if (draw)
			proof_text(p, x, y, ALIGN_LEFT, line);
		lines++;
	}
	return lines;
}

double proof_paragraph(struct proof *p, double x, double y, double width,
		       double cap, const char *text)
{
	int lines = paragraph(p, x, y, width, cap, text, true);
	return y + lines * proof_line_pitch(cap);
}

double proof_paragraph_height(struct proof *p, double width, double cap,
			      const char *text)
{
	int lines = paragraph(p, 0, 0, width, cap, text, false);
	return lines * proof_line_pitch(cap);
}

double proof_text_width(struct proof *p, const char *text)
{
	cairo_text_extents_t e;
	cairo_text_extents(p->cr, text, &e);
	return e.x_advance;
}

void proof_text(struct proof *p, double x, double y, enum proof_align align,
		const char *text)
{
	if (align == ALIGN_CENTRE)
		x -= proof_text_width(p, text) / 2;
	else if (align == ALIGN_RIGHT)
		x -= proof_text_width(p, text);
	cairo_move_to(p->cr, x, y);
	cairo_show_text(p->cr, text);
	cairo_new_path(p->cr);
}

void proof_textf(struct proof *p, double x, double y,
		   enum proof_align align, const char *format, ...)
{
	char text[512];
	va_list args;
	va_start(args, format);
	vsnprintf(text, sizeof(text), format, args);
	va_end(args);
	proof_text(p, x, y, align, text);
}

void proof_line(struct proof *p, double x0, double y0, double x1, double y1,
		double width)
{
	cairo_set_line_width(p->cr, width);
	cairo_move_to(p->cr, x0, y0);
	cairo_line_to(p->cr, x1, y1);
	cairo_stroke(p->cr);
}

/* Notes (cautions, what a design lacks) go beside the title block when
 * there is room, else in a band above it. */
#define NOTE_SIDE_LEAST 70.0
#define NOTE_BAND_LINES 4

static bool notes_beside(const struct gp_proof_plan *plan)
{
	return plan->paper_w - 2 * PROOF_MARGIN - PROOF_TITLE_W - 8 >=
	       NOTE_SIDE_LEAST;
}

double proof_area_bottom(const struct gp_proof_plan *plan)
{
	double y = plan->paper_h - PROOF_MARGIN - PROOF_TITLE_H - 4;
	if (!notes_beside(plan))
		y -= NOTE_BAND_LINES * proof_line_pitch(PROOF_LETTER) + 2;
	return y;
}

void proof_note_area(const struct proof *p, double *x, double *y,
		     double *w)
{
	double em = proof_em(PROOF_LETTER, false);
	*x = PROOF_MARGIN + 4;
	if (notes_beside(&p->plan)) {
		*w = p->plan.paper_w - 2 * PROOF_MARGIN - PROOF_TITLE_W - 8;
		*y = p->plan.paper_h - PROOF_MARGIN - PROOF_TITLE_H + 1 +
		     PROOF_ASCENT * em;
	} else {
		*w = p->plan.paper_w - 2 * PROOF_MARGIN - 8;
		*y = proof_area_bottom(&p->plan) + 2 + PROOF_ASCENT * em;
	}
}

void proof_text_fitted(struct proof *p, double x, double y, double width,
		       const char *text)
{
	char fitted[512];
	fit_text(p, text, width, fitted, sizeof(fitted));
	proof_text(p, x, y, ALIGN_LEFT, fitted);
}

void proof_area(const struct proof *p, double *x0, double *y0, double *x1,
		double *y1)
{
	*x0 = PROOF_MARGIN + 4;
	*y0 = PROOF_MARGIN + 4;
	*x1 = p->plan.paper_w - PROOF_MARGIN - 4;
	*y1 = proof_area_bottom(&p->plan);
}

/* --- frame and title block --------------------------------------------------- */

static void title_cell(struct proof *p, double x, double y, double w,
		       double h, const char *label, const char *value,
		       double cap, bool bold)
{
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	cairo_set_line_width(p->cr, 0.25);
	cairo_rectangle(p->cr, x, y, w, h);
	cairo_stroke(p->cr);
	proof_letter(p, PROOF_LETTER, false);
	proof_text(p, x + 1.2, y + 0.6 + PROOF_ASCENT * proof_em(PROOF_LETTER,
								   false),
		   ALIGN_LEFT, label);
	proof_letter(p, cap, bold);
	char fitted[256];
	fit_text(p, value, w - 2.4, fitted, sizeof(fitted));
	proof_text(p, x + 1.2, y + h - 0.6 - PROOF_DESCENT *
						 proof_em(cap, bold),
		   ALIGN_LEFT, fitted);
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
	double big = PROOF_LETTER_TITLE;
	char a[64], b[64], c[64];

	title_cell(p, x, y, 55, h, "Part number", d->part, big, true);
	title_cell(p, x + 55, y, w - 55, h, "Title", d->title, PROOF_LETTER,
		   false);
	y += h;
	revision_date(p, b, sizeof(b));
	glass_thickness(p, c, sizeof(c));
	title_cell(p, x, y, 30, h, "Revision", d->revision, big, true);
	title_cell(p, x + 30, y, 45, h, "Revision date", b, PROOF_LETTER,
		   false);
	title_cell(p, x + 75, y, 45, h, "Glass thickness", c, PROOF_LETTER,
		   false);
	snprintf(b, sizeof(b), "%s %s", p->plan.paper_name,
		 p->plan.landscape ? "landscape" : "portrait");
	title_cell(p, x + 120, y, w - 120, h, "Paper", b, PROOF_LETTER, false);
	y += h;
	title_cell(p, x, y, w, h, "Sheet title", title, PROOF_LETTER, false);
	y += h;
	if (p->sheet_scale)
		snprintf(a, sizeof(a), "%s", p->sheet_scale);
	else
		snprintf(a, sizeof(a), "%d:%d", p->plan.scale_num,
			 p->plan.scale_den);
	title_cell(p, x, y, 45, h, "Scale", a, big, true);
	snprintf(a, sizeof(a), "%d of %d", p->sheet, p->plan.sheet_count);
	title_cell(p, x + 45, y, 40, h, "Sheet", a, big, true);
	title_cell(p, x + 85, y, 25, h, "Units", "mm", PROOF_LETTER, false);
	snprintf(b, sizeof(b), "glassplot %s", GP_VERSION);
	title_cell(p, x + 110, y, w - 110, h, "Drawn by", b, PROOF_LETTER,
		   false);
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
	proof_letter(p, PROOF_LETTER_SHEET, true);
	proof_text(p, PROOF_MARGIN + 4, PROOF_SHEET_TITLE_Y, ALIGN_LEFT,
		   title);
}

void proof_end_sheet(struct proof *p)
{
	cairo_restore(p->cr);
	cairo_show_page(p->cr);
	p->sheet++;
	p->sheet_scale = NULL;
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
	proof_letter(p, PROOF_LETTER, false);
	double em = proof_em(PROOF_LETTER, false);
	int columns = p->plan.legend_columns > 0 ? p->plan.legend_columns : 1;
	for (int i = 0; i < count; i++) {
		double cx = p->plan.legend_x +
			    (i % columns) * p->plan.legend_column_w;
		double cy = p->plan.legend_y + (i / columns) * LEGEND_ROW;
		swatch(p, cx, cy + 0.5, &items[i]);
		cairo_set_source_rgb(p->cr, 0, 0, 0);
		proof_text(p, cx + 10, cy + 0.3 + PROOF_ASCENT * em, ALIGN_LEFT,
			   items[i].label);
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
	if (p->design->block_count)
		proof_sheet_lit(p, true);
	if (p->build->show)
		proof_sheet_show(p);
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
	proof_start(&p, build);
	if (!have_fonts())
		return gp_diag_fail(diag, GP_MSG_FONT_NOT_FOUND, NULL,
				    "proof.pdf: cannot open the "
				    "fonts '%s', '%s' and '%s' (install the "
				    "Liberation fonts, version 2)",
				    font_names[0], font_names[1],
				    font_names[2]);
	/* the pin matrix once, for the plan and the sheets */
	if (!proof_pins_create(&p)) {
		proof_finish(&p);
		return gp_diag_oom(diag, NULL);
	}
	plan_measured(&p, &p.plan);
	p.view = (struct proof_view){ .ox = p.plan.ox, .oy = p.plan.oy,
				      .s = p.plan.scale };
	bool ok = false;
	cairo_surface_t *surface = cairo_pdf_surface_create_for_stream(
		write_chunk, out, p.plan.paper_w * PT_PER_MM,
		p.plan.paper_h * PT_PER_MM);
	cairo_pdf_surface_restrict_to_version(surface, CAIRO_PDF_VERSION_1_5);
	set_metadata(surface, build);
	p.cr = cairo_create(surface);
	if (!proof_net_use_create(&p) || !proof_cells_create(&p)) {
		gp_diag_oom(diag, NULL);
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
		gp_diag_fail(diag, GP_MSG_INTERNAL, NULL,
			     "proof.pdf: cairo failed: %s",
			     cairo_status_to_string(status));
		goto cleanup;
	}
	ok = p.sheet - 1 == p.plan.sheet_count ||
	     gp_diag_fail(diag, GP_MSG_INTERNAL, NULL,
			  "proof.pdf: drew %d sheets, planned "
			  "%d (a bug)", p.sheet - 1, p.plan.sheet_count);
cleanup:
	if (p.cr)
		cairo_destroy(p.cr);
	cairo_surface_destroy(surface);
	proof_finish(&p);
	return ok;
}
