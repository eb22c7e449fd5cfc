/* The glass as lit with given content (preview.h): the content turned
 * into the (common, segment) pairs the firmware map gives for it, every
 * pixel at a driven pair lit, and a PNG of it. */
#include "preview.h"

#include "digits.h"
#include "font.h"
#include "output.h"
#include "units.h"

#include "glassplot.h"

#include <cairo.h>
#include <ft2build.h>
#include FT_FREETYPE_H
#include FT_TRUETYPE_TABLES_H
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* --- driven pairs ------------------------------------------------------------ */

struct pairs {
	struct gp_show_pair *items;
	size_t count, capacity;
	bool failed;
};

static void drive(struct pairs *p, int common, int segment)
{
	if (common < 0 || segment < 0)
		return;
	if (p->count == p->capacity) {
		size_t n = p->capacity ? 2 * p->capacity : 64;
		struct gp_show_pair *grown =
			realloc(p->items, n * sizeof(*grown));
		if (!grown) {
			p->failed = true;
			return;
		}
		p->items = grown;
		p->capacity = n;
	}
	p->items[p->count++] = (struct gp_show_pair){ common, segment };
}

static int compare_pairs(const void *a, const void *b)
{
	const struct gp_show_pair *x = a, *y = b;
	if (x->common != y->common)
		return (x->common > y->common) - (x->common < y->common);
	return (x->segment > y->segment) - (x->segment < y->segment);
}

/* --- digits ------------------------------------------------------------------ */

/* Segments a-g lit for a character (the usual seven-segment forms). */
static const char *seven_segments(char c)
{
	static const struct {
		char c;
		const char *segments;
	} forms[] = {
		{ '0', "abcdef" }, { '1', "bc" },     { '2', "abdeg" },
		{ '3', "abcdg" },  { '4', "bcfg" },   { '5', "acdfg" },
		{ '6', "acdefg" }, { '7', "abc" },    { '8', "abcdefg" },
		{ '9', "abcdfg" }, { 'A', "abcefg" }, { 'b', "cdefg" },
		{ 'C', "adef" },   { 'c', "deg" },    { 'd', "bcdeg" },
		{ 'E', "adefg" },  { 'F', "aefg" },   { 'H', "bcefg" },
		{ 'h', "cefg" },   { 'L', "def" },    { 'n', "ceg" },
		{ 'o', "cdeg" },   { 'P', "abefg" },  { 'r', "eg" },
		{ 't', "defg" },   { 'U', "bcdef" },  { 'u', "cde" },
		{ 'y', "bcdfg" },  { '-', "g" },      { '_', "d" },
		{ ' ', "" },
	};
	for (size_t i = 0; i < sizeof(forms) / sizeof(forms[0]); i++)
		if (forms[i].c == c)
			return forms[i].segments;
	return NULL;
}

/* The pixels of part `name` of unit `unit` of digit row `row` (a part may
 * be several pixels); false when the unit has no such part. */
static bool drive_part(const struct gp_build *build, struct pairs *p,
		       size_t row, size_t unit, const char *name, bool prefix)
{
	const struct gp_digit_unit *u = &build->digit_rows[row].units[unit];
	int part = -1;
	bool any = false;
	for (int k = 0; k < u->part_count; k++) {
		const char *n = u->parts[k].name;
		bool match = prefix ? n[0] == name[0] &&
					      (n[1] == '\0' ||
					       (n[1] >= '1' && n[1] <= '2'))
				    : strcmp(n, name) == 0;
		if (!match)
			continue;
		part = k;
		for (size_t i = 0; i < build->art.pixel_count; i++) {
			const struct gp_pixel *px = &build->art.pixels[i];
			if (px->owner_kind == GP_OWNER_DIGITS &&
			    px->owner == (int)row && px->d == (int)unit &&
			    px->b == part) {
				drive(p, px->common, px->segment);
				any = true;
			}
		}
	}
	return any;
}

/* The unit of row showing digit number (1-based), or -1. */
static int unit_of(const struct gp_digit_row *r, int number)
{
	for (size_t i = 0; i < r->unit_count; i++)
		if (r->units[i].number == number)
			return (int)i;
	return -1;
}

struct shown_digit {
	char c;
	bool point, colon;
};

static bool show_digits(const struct gp_build *build, size_t row,
			const char *text, struct pairs *p,
			struct gp_diag *diag)
{
	const struct gp_digits *d = &build->design->digits[row];
	const struct gp_digit_row *r = &build->digit_rows[row];
	struct shown_digit shown[GP_DIGITS_MAX_COUNT + 2];
	int n = 0;
	for (const char *s = text; *s; s++) {
		if ((*s == '.' || *s == ':') && n > 0) {
			if (*s == '.')
				shown[n - 1].point = true;
			else
				shown[n - 1].colon = true;
			continue;
		}
		if (n == GP_DIGITS_MAX_COUNT + 2)
			return gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
					    "--show: '%s' is longer "
					    "than digit row '%s'", text,
					    d->name);
		shown[n++] = (struct shown_digit){ *s, false, false };
	}
	/* a sign unit takes the leading '-', '1' or "-1" the digits leave */
	int first = 0;
	int sign = unit_of(r, 0);
	if (n > d->count && sign >= 0) {
		while (first < n - d->count) {
			const char *part = shown[first].c == '-' ? "minus"
					   : shown[first].c == '1' ? "one"
								   : NULL;
			if (!part || !drive_part(build, p, row, (size_t)sign,
						 part, false))
				return gp_diag_fail(
					diag, GP_MSG_BAD_SHOW, NULL, "--show: the sign of digit "
					"row '%s' cannot show '%c'", d->name,
					shown[first].c);
			first++;
		}
	}
	if (n - first > d->count)
		return gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
				    "--show: '%s' has more digits "
				    "than digit row '%s' (%ld)", text, d->name,
				    d->count);
	/* right-aligned */
	int number = (int)d->count - (n - first) + 1;
	for (int i = first; i < n; i++, number++) {
		int unit = unit_of(r, number);
		const char *segments = seven_segments(shown[i].c);
		if (!segments)
			return gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
					    "--show: digit row '%s' "
					    "cannot show '%c' (digits, A-F, "
					    "-, _ and a few letters)",
					    d->name, shown[i].c);
		if (unit < 0)
			continue;
		for (const char *s = segments; *s; s++) {
			char name[2] = { *s, '\0' };
			drive_part(build, p, row, (size_t)unit, name, true);
		}
		if (shown[i].point &&
		    !drive_part(build, p, row, (size_t)unit, "dp", false))
			return gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
					    "--show: digit %d of "
					    "row '%s' has no point", number,
					    d->name);
		if (shown[i].colon &&
		    !drive_part(build, p, row, (size_t)unit, "colon", false))
			return gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
					    "--show: digit %d of "
					    "row '%s' has no colon after it",
					    number, d->name);
	}
	return true;
}

/* --- text in a dot matrix ------------------------------------------------------ */

static FT_Face open_mono(FT_Library library, struct gp_diag *diag)
{
	struct gp_font *font = gp_font_open("Liberation Mono", NULL, NULL,
					    diag);
	FT_Face face = NULL;
	if (font && FT_New_Face(library, gp_font_file(font),
				gp_font_face_index(font), &face))
		face = NULL;
	gp_font_destroy(font);
	if (!face)
		gp_diag_fail(diag, GP_MSG_FONT_NOT_FOUND, NULL,
			     "--show: cannot open the font "
			     "'Liberation Mono' for text in a dot matrix");
	return face;
}

/* One character into cell (line, cell) of block b: the glyph rendered
 * in black and white at a size whose capitals fill the rows above the
 * last (the descenders' row), centred across. */
static bool show_char(const struct gp_build *build, size_t index, FT_Face face,
		      long line, long cell, unsigned long code,
		      struct pairs *p)
{
	const struct gp_block *b = &build->design->blocks[index];
	const struct gp_block_nets *n = &build->blocks[index];
	long rows = b->dots_down, cols = b->dots_across;
	long caps = rows > 3 ? rows - 1 : rows;
	double cap = 0.7;
	const TT_OS2 *os2 = FT_Get_Sfnt_Table(face, FT_SFNT_OS2);
	if (os2 && os2->sCapHeight > 0)
		cap = (double)os2->sCapHeight / face->units_per_EM;
	FT_UInt ppem = (FT_UInt)(caps / cap + 0.5);
	if (ppem < 1 || FT_Set_Pixel_Sizes(face, 0, ppem) ||
	    FT_Load_Char(face, code, FT_LOAD_RENDER | FT_LOAD_TARGET_MONO))
		return false;
	FT_Bitmap *bm = &face->glyph->bitmap;
	/* baseline under the capitals: row caps - 1 from the top */
	long top = caps - face->glyph->bitmap_top;
	long left = (cols - (long)bm->width) / 2;
	long segment_line = b->share_segments ? 0 : line;
	for (unsigned int y = 0; y < bm->rows; y++)
		for (unsigned int x = 0; x < bm->width; x++) {
			const unsigned char *row = bm->buffer + y * bm->pitch;
			if (!(row[x / 8] & (0x80 >> (x % 8))))
				continue;
			long r = top + (long)y, c = left + (long)x;
			if (r < 0 || r >= rows || c < 0 || c >= cols)
				continue;
			drive(p, n->first_common + (int)(line * rows + r),
			      n->first_segment +
				      (int)((segment_line * b->cells + cell) *
						    cols +
					    c));
		}
	return true;
}

/* The next character of UTF-8 text (a bad byte stands for itself). */
static unsigned long next_code(const char **s)
{
	const unsigned char *u = (const unsigned char *)*s;
	unsigned long c = u[0];
	int more = c >= 0xf0 ? 3 : c >= 0xe0 ? 2 : c >= 0xc0 ? 1 : 0;
	for (int i = 1; i <= more; i++) {
		if ((u[i] & 0xc0) != 0x80) {
			more = 0;
			break;
		}
	}
	if (more) {
		c &= 0x3f >> more;
		for (int i = 1; i <= more; i++)
			c = c << 6 | (u[i] & 0x3f);
	}
	*s += 1 + more;
	return c;
}

static bool show_text(const struct gp_build *build, size_t index,
		      const char *text, struct pairs *p, struct gp_diag *diag)
{
	const struct gp_block *b = &build->design->blocks[index];
	FT_Library library;
	if (FT_Init_FreeType(&library))
		return gp_diag_fail(diag, GP_MSG_INTERNAL, NULL,
				    "--show: cannot start "
				    "FreeType");
	FT_Face face = open_mono(library, diag);
	bool ok = face != NULL;
	long line = 0, cell = 0;
	for (const char *s = text; ok && *s;) {
		if (*s == '|') {
			s++;
			line++;
			cell = 0;
			if (line >= b->lines)
				ok = gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
						  "--show: '%s' has "
						  "more lines than block "
						  "'%s' (%ld)", text, b->name,
						  b->lines);
			continue;
		}
		unsigned long code = next_code(&s);
		if (cell >= b->cells) {
			ok = gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
					  "--show: line %ld of "
					  "'%s' is longer than block '%s' "
					  "(%ld cells)", line + 1, text,
					  b->name, b->cells);
			break;
		}
		if (code != ' ' &&
		    !show_char(build, index, face, line, cell, code, p))
			ok = gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
					  "--show: cannot render "
					  "character %lu of '%s'", code, text);
		cell++;
	}
	if (face)
		FT_Done_Face(face);
	FT_Done_FreeType(library);
	return ok;
}

/* --- icons -------------------------------------------------------------------- */

static bool show_icon(const struct gp_build *build, size_t index,
		      struct pairs *p)
{
	for (size_t i = 0; i < build->art.pixel_count; i++) {
		const struct gp_pixel *px = &build->art.pixels[i];
		if (px->owner_kind == GP_OWNER_ICON && px->owner == (int)index)
			drive(p, px->common, px->segment);
	}
	return true;
}

/* --- the content ------------------------------------------------------------- */

static bool show_item(const struct gp_build *build, const char *item,
		      struct pairs *p, struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	const char *eq = strchr(item, '=');
	size_t len = eq ? (size_t)(eq - item) : strlen(item);
	if (eq) {
		for (size_t i = 0; i < build->digit_row_count; i++)
			if (strlen(d->digits[i].name) == len &&
			    strncmp(d->digits[i].name, item, len) == 0)
				return show_digits(build, i, eq + 1, p, diag);
		for (size_t i = 0; i < d->block_count; i++)
			if (strlen(d->blocks[i].name) == len &&
			    strncmp(d->blocks[i].name, item, len) == 0)
				return show_text(build, i, eq + 1, p, diag);
		return gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
				    "--show: '%.*s' is no digit "
				    "row or block of this glass", (int)len,
				    item);
	}
	for (size_t i = 0; i < d->icon_count; i++)
		if (strcmp(d->icons[i].name, item) == 0)
			return show_icon(build, i, p);
	return gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
			    "--show: '%s' is no icon of this "
			    "glass (ROW=DIGITS, BLOCK=TEXT or an icon's "
			    "name)", item);
}

static bool driven(const struct gp_show *show, int common, int segment)
{
	struct gp_show_pair key = { common, segment };
	return bsearch(&key, show->pairs, show->pair_count, sizeof(key),
		       compare_pairs) != NULL;
}

struct gp_show *gp_show_create(const struct gp_build *build, const char *spec,
			       struct gp_diag *diag)
{
	struct gp_show *show = calloc(1, sizeof(*show));
	char *copy = strdup(spec);
	struct pairs p = { 0 };
	bool ok = show && copy;
	char *save = NULL;
	for (char *item = ok ? strtok_r(copy, ";", &save) : NULL; ok && item;
	     item = strtok_r(NULL, ";", &save))
		ok = show_item(build, item, &p, diag);
	free(copy);
	if (ok && p.failed)
		ok = gp_diag_oom(diag, NULL);
	if (!ok) {
		free(p.items);
		gp_show_destroy(show);
		return NULL;
	}
	qsort(p.items, p.count, sizeof(*p.items), compare_pairs);
	size_t k = 0;
	for (size_t i = 0; i < p.count; i++)
		if (!k || compare_pairs(&p.items[i], &p.items[k - 1]))
			p.items[k++] = p.items[i];
	show->pairs = p.items;
	show->pair_count = k;
	show->spec = strdup(spec);
	show->pixel_count = build->art.pixel_count;
	show->lit = calloc(show->pixel_count ? show->pixel_count : 1,
			   sizeof(*show->lit));
	if (!show->spec || !show->lit) {
		gp_show_destroy(show);
		gp_diag_oom(diag, NULL);
		return NULL;
	}
	for (size_t i = 0; i < show->pixel_count; i++) {
		const struct gp_pixel *px = &build->art.pixels[i];
		show->lit[i] = driven(show, px->common, px->segment);
	}
	return show;
}

void gp_show_destroy(struct gp_show *show)
{
	if (!show)
		return;
	free(show->spec);
	free(show->pairs);
	free(show->lit);
	free(show);
}

/* --- PNG ----------------------------------------------------------------------- */

static cairo_status_t append_png(void *closure, const unsigned char *data,
				 unsigned int length)
{
	return gp_buffer_append(closure, data, length)
		       ? CAIRO_STATUS_SUCCESS
		       : CAIRO_STATUS_WRITE_ERROR;
}

static void add_ring(cairo_t *cr, const struct gp_ring *ring, bool outer)
{
	if (ring->count < 3)
		return;
	bool reverse = (gp_ring_area2(ring) > 0) != outer;
	for (size_t i = 0; i < ring->count; i++) {
		const struct gp_point *q =
			&ring->points[reverse ? ring->count - 1 - i : i];
		if (i == 0)
			cairo_move_to(cr, gp_mm(q->x), gp_mm(q->y));
		else
			cairo_line_to(cr, gp_mm(q->x), gp_mm(q->y));
	}
	cairo_close_path(cr);
}

static void add_polygon(cairo_t *cr, const struct gp_polygon *poly)
{
	add_ring(cr, &poly->outer, true);
	for (size_t i = 0; i < poly->hole_count; i++)
		add_ring(cr, &poly->holes[i], false);
}

static void add_box(cairo_t *cr, struct gp_box b)
{
	cairo_rectangle(cr, gp_mm(b.x0), gp_mm(b.y0), gp_mm(gp_box_width(b)),
			gp_mm(gp_box_height(b)));
}

bool gp_show_png(const struct gp_build *build, const struct gp_show *show,
		 double dpi, struct gp_buffer *out, struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	struct gp_box g = gp_box_union(d->front.box, d->back.box);
	double s = dpi / 25.4;    /* pixels per mm */
	int w = (int)(s * gp_mm(gp_box_width(g)) + 0.5);
	int h = (int)(s * gp_mm(gp_box_height(g)) + 0.5);
	if (w < 1 || h < 1 || w > 20000 || h > 20000)
		return gp_diag_fail(diag, GP_MSG_OUT_OF_RANGE, NULL,
				    "preview: %d x %d pixels at "
				    "%g dpi is out of range", w, h, dpi);
	cairo_surface_t *surface =
		cairo_image_surface_create(CAIRO_FORMAT_RGB24, w, h);
	cairo_t *cr = cairo_create(surface);
	/* glass frame: x right, y up */
	cairo_scale(cr, s, -s);
	cairo_translate(cr, -gp_mm(g.x0), -gp_mm(g.y1));
	bool negative = d->drive.mode == GP_MODE_NEGATIVE;
	cairo_set_source_rgb(cr, 0.93, 0.94, 0.95);
	cairo_paint(cr);
	if (negative)
		cairo_set_source_rgb(cr, 0.10, 0.12, 0.16);
	else
		cairo_set_source_rgb(cr, 0.80, 0.84, 0.76);
	add_box(cr, d->viewing);
	cairo_fill(cr);
	for (size_t i = 0; i < show->pixel_count; i++) {
		if (!show->lit[i])
			continue;
		const struct gp_pixel *px = &build->art.pixels[i];
		if (px->shape.outer.count)
			add_polygon(cr, &px->shape);
		else
			add_box(cr, px->box);
		for (size_t k = 0; k < px->more.count; k++)
			add_polygon(cr, &px->more.items[k]);
	}
	if (negative)
		cairo_set_source_rgb(cr, 0.86, 0.92, 0.80);
	else
		cairo_set_source_rgb(cr, 0.10, 0.12, 0.14);
	cairo_set_fill_rule(cr, CAIRO_FILL_RULE_WINDING);
	cairo_fill(cr);
	cairo_destroy(cr);
	cairo_status_t status =
		cairo_surface_write_to_png_stream(surface, append_png, out);
	cairo_surface_destroy(surface);
	if (status != CAIRO_STATUS_SUCCESS || out->failed)
		return gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
				    "preview: cannot write the "
				    "PNG: %s", cairo_status_to_string(status));
	return true;
}

/* --- the API ------------------------------------------------------------------ */

GP_EXPORT bool gp_build_show(struct gp_build *build, const char *spec,
			     struct gp_diag *diag)
{
	struct gp_show *show = gp_show_create(build, spec, diag);
	if (!show)
		return false;
	gp_show_destroy(build->show);
	build->show = show;
	return true;
}

GP_EXPORT bool gp_build_write_preview(const struct gp_build *build,
				      const char *path, double dpi,
				      struct gp_diag *diag)
{
	if (!build->show)
		return gp_diag_fail(diag, GP_MSG_BAD_SHOW, NULL,
				    "preview: no content to show "
				    "(give --show)");
	struct gp_output_set set;
	gp_output_set_init(&set);
	const char *slash = strrchr(path, '/');
	char folder[1024];
	snprintf(folder, sizeof(folder), "%.*s",
		 slash ? (int)(slash - path) : 1, slash ? path : ".");
	if (slash == path)
		snprintf(folder, sizeof(folder), "/");
	struct gp_buffer *out =
		gp_output_add(&set, slash ? slash + 1 : path, diag);
	bool ok = out && gp_show_png(build, build->show, dpi, out, diag) &&
		  gp_output_commit(&set, folder, diag);
	gp_output_set_finish(&set);
	return ok;
}
