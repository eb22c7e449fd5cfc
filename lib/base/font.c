/* Fonts: fontconfig lookup, HarfBuzz shaping, FreeType outlines flattened
 * into rings.  See font.h. */
#include "font.h"

#include "array.h"
#include "geos.h"

#include <ft2build.h>
#include FT_FREETYPE_H
#include FT_OUTLINE_H
#include FT_BBOX_H
#include FT_TRUETYPE_TABLES_H
#include <fontconfig/fontconfig.h>
#include <hb-ft.h>
#include <hb.h>

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* Outlines are loaded unhinted and without embedded bitmaps: the artwork
 * needs the designer's curves, not shapes tuned for a pixel grid. */
#define LOAD_FLAGS (FT_LOAD_NO_HINTING | FT_LOAD_NO_BITMAP)

/* Most points one curve may be cut into (bounds the work per glyph). */
#define MAX_CURVE_STEPS 4096

struct gp_font {
	FT_Library library;
	FT_Face face;
	hb_font_t *hb;
	char *file;
	long index;
	char *family;
	char *style;
	int cap_units;
};

/* FreeType's own error texts, through its documented FT_ERRORDEF hook. */
#undef FTERRORS_H_
#define FT_ERRORDEF(e, v, s) { e, s },
#define FT_ERROR_START_LIST {
#define FT_ERROR_END_LIST { 0, NULL } };
static const struct {
	int code;
	const char *text;
} ft_errors[] =
#include FT_ERRORS_H

static const char *ft_error_text(FT_Error error)
{
	for (size_t i = 0; ft_errors[i].text; i++)
		if (ft_errors[i].code == error)
			return ft_errors[i].text;
	return "unknown FreeType error";
}

static char *join_path(const char *dir, const char *name)
{
	if (!dir || !*dir || name[0] == '/')
		return strdup(name);
	size_t n = strlen(dir) + strlen(name) + 2;
	char *path = malloc(n);
	if (path)
		snprintf(path, n, "%s/%s", dir, name);
	return path;
}

/* Resolves a fontconfig pattern to a file and face index.  The family
 * asked for must be among the match's families: fontconfig always returns
 * some font, and a silent substitute would change the artwork. */
static bool resolve_pattern(struct gp_font *font, const char *name,
			    const struct gp_where *where, struct gp_diag *diag)
{
	bool ok = false;
	char *wanted = NULL;
	FcPattern *match = NULL;
	FcConfig *config = FcInitLoadConfigAndFonts();
	FcPattern *pattern = FcNameParse((const FcChar8 *)name);
	if (!config || !pattern) {
		gp_diag_error(diag, where,
			      "font '%s' is not a fontconfig pattern; expected "
			      "a family and style such as \"Liberation Sans:bold\" "
			      "or a file path containing '/'", name);
		goto out;
	}
	FcChar8 *family = NULL;
	if (FcPatternGetString(pattern, FC_FAMILY, 0, &family) !=
		    FcResultMatch || !family[0]) {
		/* without a family fontconfig picks any font */
		gp_diag_error(diag, where,
			      "font '%s' names no family; expected a family "
			      "and style such as \"Liberation Sans:bold\" or "
			      "a file path containing '/'", name);
		goto out;
	}
	wanted = strdup((const char *)family);
	if (!wanted)
		goto nomem;
	if (!FcConfigSubstitute(config, pattern, FcMatchPattern))
		goto nomem;
	FcDefaultSubstitute(pattern);
	FcResult result;
	match = FcFontMatch(config, pattern, &result);
	if (!match) {
		gp_diag_error(diag, where,
			      "font '%s' not found: fontconfig knows no font "
			      "at all; install an outline font such as the "
			      "Debian package fonts-liberation2", name);
		goto out;
	}
	bool found = false;
	FcChar8 *got = NULL;
	FcChar8 *first = NULL;
	for (int i = 0; FcPatternGetString(match, FC_FAMILY, i, &got) ==
			FcResultMatch; i++) {
		if (i == 0)
			first = got;
		if (FcStrCmpIgnoreCase(got, (const FcChar8 *)wanted) == 0)
			found = true;
	}
	if (!found) {
		gp_diag_error(diag, where,
			      "font '%s' not found: fontconfig has no family "
			      "'%s'; install the font or name an installed "
			      "family (fc-list lists them) or a font file",
			      name, wanted);
		/* the substitute depends on the machine: a note, not part of
		 * the error line */
		gp_diag_note(diag, where, "fontconfig would substitute '%s'",
			     first ? (const char *)first : "?");
		goto out;
	}
	FcChar8 *file = NULL;
	int index = 0;
	if (FcPatternGetString(match, FC_FILE, 0, &file) != FcResultMatch) {
		gp_diag_error(diag, where,
			      "font '%s': fontconfig's match has no file; "
			      "expected an installed font file", name);
		goto out;
	}
	FcPatternGetInteger(match, FC_INDEX, 0, &index);
	font->file = strdup((const char *)file);
	if (!font->file)
		goto nomem;
	font->index = index;
	ok = true;
	goto out;
nomem:
	gp_diag_oom(diag, where);
out:
	free(wanted);
	if (match)
		FcPatternDestroy(match);
	if (pattern)
		FcPatternDestroy(pattern);
	if (config)
		FcConfigDestroy(config);
	return ok;
}

static int measure_cap_height(FT_Face face)
{
	TT_OS2 *os2 = FT_Get_Sfnt_Table(face, FT_SFNT_OS2);
	if (os2 && os2->version >= 2 && os2->sCapHeight > 0)
		return os2->sCapHeight;
	FT_UInt h = FT_Get_Char_Index(face, 'H');
	if (!h || FT_Load_Glyph(face, h, LOAD_FLAGS) ||
	    face->glyph->format != FT_GLYPH_FORMAT_OUTLINE)
		return 0;
	FT_BBox box;
	if (FT_Outline_Get_BBox(&face->glyph->outline, &box))
		return 0;
	/* the size makes one pixel one font unit: 26.6 -> units */
	return (int)(box.yMax / 64);
}

static bool open_face(struct gp_font *font, const char *name,
		      const struct gp_where *where, struct gp_diag *diag)
{
	FT_Error error = FT_Init_FreeType(&font->library);
	if (error)
		return gp_diag_error(diag, where, "cannot start FreeType: %s",
				     ft_error_text(error));
	if (access(font->file, R_OK) != 0)
		return gp_diag_error(diag, where,
				     "font '%s': cannot read '%s': %s; expected "
				     "a readable font file", name, font->file,
				     strerror(errno));
	/* a FIFO or a device would block or never end */
	struct stat st;
	if (stat(font->file, &st) != 0 || !S_ISREG(st.st_mode))
		return gp_diag_error(diag, where,
				     "font '%s': '%s' is not a regular file; "
				     "expected a font file", name, font->file);
	error = FT_New_Face(font->library, font->file, font->index,
			    &font->face);
	if (error)
		return gp_diag_error(diag, where,
				     "font '%s': '%s' is not a font FreeType "
				     "can read (%s)", name, font->file,
				     ft_error_text(error));
	if (!FT_IS_SCALABLE(font->face))
		return gp_diag_error(diag, where,
				     "font '%s'%s%s%s has only bitmaps; glass "
				     "artwork needs an outline font (TrueType "
				     "or OpenType)", name,
				     strcmp(name, font->file) ? " ('" : "",
				     strcmp(name, font->file) ? font->file : "",
				     strcmp(name, font->file) ? "')" : "");
	/* One pixel per font unit: outlines and HarfBuzz positions come out
	 * in 26.6 font units with nothing lost to scaling. */
	FT_UShort upem = font->face->units_per_EM;
	error = FT_Set_Char_Size(font->face, 0, (FT_F26Dot6)upem * 64, 72,
				 72);
	if (error)
		return gp_diag_error(diag, where, "font '%s': cannot set its "
				     "size (%s)", name, ft_error_text(error));
	font->family = strdup(font->face->family_name ?
			      font->face->family_name : "");
	font->style = strdup(font->face->style_name ?
			     font->face->style_name : "");
	font->hb = hb_ft_font_create_referenced(font->face);
	if (!font->family || !font->style || !font->hb)
		return gp_diag_oom(diag, where);
	hb_ft_font_set_load_flags(font->hb, LOAD_FLAGS);
	font->cap_units = measure_cap_height(font->face);
	return true;
}

struct gp_font *gp_font_open(const char *name, const char *base_dir,
			     const struct gp_where *where,
			     struct gp_diag *diag)
{
	struct gp_font *font = calloc(1, sizeof(*font));
	if (!font) {
		gp_diag_oom(diag, where);
		return NULL;
	}
	if (!name || !*name) {
		gp_diag_error(diag, where, "font name is empty; expected a "
			      "fontconfig pattern or a file path");
		goto fail;
	}
	if (strchr(name, '/')) {
		font->file = join_path(base_dir, name);
		if (!font->file) {
			gp_diag_oom(diag, where);
			goto fail;
		}
	} else if (!resolve_pattern(font, name, where, diag)) {
		goto fail;
	}
	if (!open_face(font, name, where, diag))
		goto fail;
	return font;
fail:
	gp_font_destroy(font);
	return NULL;
}

void gp_font_destroy(struct gp_font *font)
{
	if (!font)
		return;
	/* the HarfBuzz font holds its own reference to the face */
	if (font->hb)
		hb_font_destroy(font->hb);
	if (font->face)
		FT_Done_Face(font->face);
	if (font->library)
		FT_Done_FreeType(font->library);
	free(font->file);
	free(font->family);
	free(font->style);
	free(font);
}

const char *gp_font_file(const struct gp_font *font) { return font->file; }
long gp_font_face_index(const struct gp_font *font) { return font->index; }
const char *gp_font_family(const struct gp_font *font) { return font->family; }
const char *gp_font_style(const struct gp_font *font) { return font->style; }

int gp_font_units_per_em(const struct gp_font *font)
{
	return font->face->units_per_EM;
}

int gp_font_cap_height_units(const struct gp_font *font)
{
	return font->cap_units;
}

void gp_text_style_init(struct gp_text_style *style)
{
	memset(style, 0, sizeof(*style));
	style->align = GP_TEXT_LEFT;
	style->base = GP_TEXT_BASELINE;
	style->kerning = true;
	style->chord_tolerance = GP_FONT_DEFAULT_TOLERANCE;
}

void gp_text_init(struct gp_text *text)
{
	memset(text, 0, sizeof(*text));
	text->bounds = gp_box_none();
}

static void glyph_finish(struct gp_glyph *glyph)
{
	for (size_t i = 0; i < glyph->ring_count; i++)
		gp_ring_finish(&glyph->rings[i]);
	free(glyph->rings);
}

void gp_text_finish(struct gp_text *text)
{
	for (size_t i = 0; i < text->count; i++)
		glyph_finish(&text->glyphs[i]);
	free(text->glyphs);
	gp_text_init(text);
}

size_t gp_utf8_decode(const char *s, uint32_t *code)
{
	const unsigned char *u = (const unsigned char *)s;
	size_t n;
	uint32_t c;
	if (u[0] < 0x80) {
		*code = u[0];
		return u[0] ? 1 : 0;
	} else if ((u[0] & 0xe0) == 0xc0) {
		n = 2, c = u[0] & 0x1f;
	} else if ((u[0] & 0xf0) == 0xe0) {
		n = 3, c = u[0] & 0x0f;
	} else if ((u[0] & 0xf8) == 0xf0) {
		n = 4, c = u[0] & 0x07;
	} else {
		return 0;
	}
	for (size_t i = 1; i < n; i++) {
		if ((u[i] & 0xc0) != 0x80)
			return 0;
		c = (c << 6) | (u[i] & 0x3f);
	}
	static const uint32_t least[] = { 0, 0, 0x80, 0x800, 0x10000 };
	if (c < least[n] || c > 0x10ffff || (c >= 0xd800 && c <= 0xdfff))
		return 0;
	*code = c;
	return n;
}

/* --- outline to rings ---------------------------------------------------- */

/* Feeds FT_Outline_Decompose's callbacks into rings of one glyph, in
 * nanometres of the text's own frame (pen at the origin, baseline y = 0). */
struct builder {
	struct gp_glyph *glyph;
	struct gp_ring ring;     /* contour being built */
	double scale;            /* nm per 26.6 unit */
	double ox, oy;           /* glyph origin, nm */
	double tolerance;        /* nm */
	double cx, cy;           /* current point, nm, unrounded */
	bool failed;
};

static void to_nm(const struct builder *b, const FT_Vector *v, double *x,
		  double *y)
{
	/* 26.6 fixed point: the value is v / 64 font units; scale holds the
	 * 1/64 together with nm per font unit */
	*x = b->ox + (double)v->x * b->scale;
	*y = b->oy + (double)v->y * b->scale;
}

static void push(struct builder *b, double x, double y)
{
	if (!gp_ring_push(&b->ring, llround(x), llround(y)))
		b->failed = true;
	b->cx = x;
	b->cy = y;
}

/* Ends the contour being built; contours that flatten to fewer than three
 * distinct points enclose nothing and are dropped. */
static void close_ring(struct builder *b)
{
	gp_ring_clean(&b->ring);
	if (b->ring.count < 3) {
		gp_ring_finish(&b->ring);
		return;
	}
	struct gp_glyph *g = b->glyph;
	if (!gp_array_reserve(g->rings, g->ring_capacity, g->ring_count + 1)) {
		b->failed = true;
		gp_ring_finish(&b->ring);
		return;
	}
	g->rings[g->ring_count++] = b->ring;
	gp_ring_init(&b->ring);
}

static int steps_for(double deviation, double factor, double tolerance)
{
	double n = ceil(sqrt(factor * deviation / tolerance));
	if (!(n >= 1))
		return 1;
	return n > MAX_CURVE_STEPS ? MAX_CURVE_STEPS : (int)n;
}

static int move_to(const FT_Vector *to, void *user)
{
	struct builder *b = user;
	close_ring(b);
	double x, y;
	to_nm(b, to, &x, &y);
	push(b, x, y);
	return b->failed;
}

static int line_to(const FT_Vector *to, void *user)
{
	struct builder *b = user;
	double x, y;
	to_nm(b, to, &x, &y);
	push(b, x, y);
	return b->failed;
}

/* A quadratic's chord error over a parameter step h is at most
 * h^2 |P0 - 2 P1 + P2| / 4, so n = ceil(sqrt(|d| / (4 tol))) steps keep
 * every chord within tolerance of the curve. */
static int conic_to(const FT_Vector *control, const FT_Vector *to,
		    void *user)
{
	struct builder *b = user;
	double x0 = b->cx, y0 = b->cy, x1, y1, x2, y2;
	to_nm(b, control, &x1, &y1);
	to_nm(b, to, &x2, &y2);
	double d = hypot(x0 - 2 * x1 + x2, y0 - 2 * y1 + y2);
	int n = steps_for(d, 0.25, b->tolerance);
	for (int i = 1; i < n; i++) {
		double t = (double)i / n, s = 1 - t;
		push(b, s * s * x0 + 2 * s * t * x1 + t * t * x2,
		     s * s * y0 + 2 * s * t * y1 + t * t * y2);
	}
	push(b, x2, y2);
	return b->failed;
}

/* A cubic's second derivative is at most 6 max(|P0 - 2 P1 + P2|,
 * |P1 - 2 P2 + P3|), so the chord error over a step h is at most
 * h^2 * 6 M / 8: n = ceil(sqrt(3 M / (4 tol))). */
static int cubic_to(const FT_Vector *c1, const FT_Vector *c2,
		    const FT_Vector *to, void *user)
{
	struct builder *b = user;
	double x0 = b->cx, y0 = b->cy, x1, y1, x2, y2, x3, y3;
	to_nm(b, c1, &x1, &y1);
	to_nm(b, c2, &x2, &y2);
	to_nm(b, to, &x3, &y3);
	double d1 = hypot(x0 - 2 * x1 + x2, y0 - 2 * y1 + y2);
	double d2 = hypot(x1 - 2 * x2 + x3, y1 - 2 * y2 + y3);
	int n = steps_for(d1 > d2 ? d1 : d2, 0.75, b->tolerance);
	for (int i = 1; i < n; i++) {
		double t = (double)i / n, s = 1 - t;
		double k0 = s * s * s, k1 = 3 * s * s * t, k2 = 3 * s * t * t,
		       k3 = t * t * t;
		push(b, k0 * x0 + k1 * x1 + k2 * x2 + k3 * x3,
		     k0 * y0 + k1 * y1 + k2 * y2 + k3 * y3);
	}
	push(b, x3, y3);
	return b->failed;
}

static const FT_Outline_Funcs outline_funcs = {
	.move_to = move_to,
	.line_to = line_to,
	.conic_to = conic_to,
	.cubic_to = cubic_to,
	.shift = 0,
	.delta = 0,
};

/* --- setting text --------------------------------------------------------- */

static bool check_style(const struct gp_font *font,
			const struct gp_text_style *style,
			const struct gp_where *where, struct gp_diag *diag)
{
	if (style->cap_height < 0 ||
	    (style->cap_height == 0 && style->em_size <= 0))
		return gp_diag_error(diag, where,
				     "text size must be positive; expected a "
				     "cap height or an em size above 0 mm");
	if (style->cap_height > 0 && font->cap_units <= 0)
		return gp_diag_error(diag, where,
				     "font '%s %s' states no cap height and has "
				     "no letter H; size it by em size instead",
				     font->family, font->style);
	if (style->chord_tolerance < GP_FONT_MIN_TOLERANCE)
		return gp_diag_error(diag, where,
				     "chord tolerance must be at least 0.00001 "
				     "mm");
	if (style->rotation % 90 != 0 || style->rotation < 0 ||
	    style->rotation >= 360)
		return gp_diag_error(diag, where,
				     "rotation %d is not one of 0, 90, 180, 270",
				     style->rotation);
	return true;
}

static bool check_text(const char *utf8, const struct gp_where *where,
		       struct gp_diag *diag)
{
	size_t length = strlen(utf8);
	if (length == 0)
		return gp_diag_error(diag, where, "text is empty; expected "
				     "at least one character");
	if (length > GP_FONT_MAX_TEXT)
		return gp_diag_error(diag, where, "text is %zu bytes long; "
				     "the limit is %d", length,
				     GP_FONT_MAX_TEXT);
	for (size_t i = 0; i < length;) {
		uint32_t c;
		size_t n = gp_utf8_decode(utf8 + i, &c);
		if (n == 0)
			return gp_diag_error(diag, where, "text is not valid "
					     "UTF-8 at byte %zu", i);
		if (c < 0x20 || c == 0x7f)
			return gp_diag_error(diag, where, "text holds control "
					     "character U+%04X; expected one "
					     "line of printable text",
					     (unsigned)c);
		i += n;
	}
	return true;
}

static bool add_glyph(struct gp_text *out, struct gp_glyph **glyph)
{
	struct gp_glyph *glyphs =
		realloc(out->glyphs, (out->count + 1) * sizeof(*glyphs));
	if (!glyphs)
		return false;
	out->glyphs = glyphs;
	*glyph = &glyphs[out->count++];
	memset(*glyph, 0, sizeof(**glyph));
	(*glyph)->bounds = gp_box_none();
	return true;
}

static struct gp_box rings_bounds(const struct gp_ring *rings, size_t count)
{
	struct gp_box box = gp_box_none();
	for (size_t r = 0; r < count; r++)
		for (size_t i = 0; i < rings[r].count; i++) {
			struct gp_point p = rings[r].points[i];
			box = gp_box_union(box, gp_box_make(p.x, p.y, p.x,
							    p.y));
		}
	return box;
}

static bool outline_glyph(struct gp_font *font, struct gp_glyph *glyph,
			  struct builder *b, const struct gp_where *where,
			  struct gp_diag *diag)
{
	FT_Error error = FT_Load_Glyph(font->face, glyph->glyph, LOAD_FLAGS);
	if (error)
		return gp_diag_error(diag, where, "font '%s %s': cannot load "
				     "glyph %u (%s)", font->family,
				     font->style, glyph->glyph,
				     ft_error_text(error));
	FT_GlyphSlot slot = font->face->glyph;
	if (slot->format != FT_GLYPH_FORMAT_OUTLINE)
		return gp_diag_error(diag, where, "font '%s %s': glyph %u has "
				     "no outline (only a bitmap); expected an "
				     "outline font", font->family, font->style,
				     glyph->glyph);
	glyph->even_odd = slot->outline.flags & FT_OUTLINE_EVEN_ODD_FILL;
	b->glyph = glyph;
	gp_ring_init(&b->ring);
	error = FT_Outline_Decompose(&slot->outline, &outline_funcs, b);
	if (!error && !b->failed)
		close_ring(b);
	gp_ring_finish(&b->ring);
	if (error || b->failed)
		return gp_diag_error(diag, where, "font '%s %s': cannot "
				     "decompose glyph %u (%s)", font->family,
				     font->style, glyph->glyph,
				     b->failed ? "out of memory" :
				     ft_error_text(error));
	glyph->bounds = rings_bounds(glyph->rings, glyph->ring_count);
	return true;
}

static bool missing_glyph(const struct gp_font *font, const char *utf8,
			  unsigned cluster, const struct gp_where *where,
			  struct gp_diag *diag)
{
	uint32_t c = 0;
	size_t n = gp_utf8_decode(utf8 + cluster, &c);
	return gp_diag_error(diag, where,
			     "font '%s %s' has no glyph for '%.*s' (U+%04X); "
			     "choose a font that has it or change the text",
			     font->family, font->style, (int)n, utf8 + cluster,
			     (unsigned)c);
}

static bool no_advance(const struct gp_font *font, const char *utf8,
		       unsigned cluster, const struct gp_where *where,
		       struct gp_diag *diag)
{
	uint32_t c = 0;
	size_t n = gp_utf8_decode(utf8 + cluster, &c);
	return gp_diag_error(diag, where,
			     "font '%s %s' gives '%.*s' (U+%04X) no advance "
			     "width, so the next letter would overlap it (a "
			     "broken hmtx table?); choose another font",
			     font->family, font->style, (int)n, utf8 + cluster,
			     (unsigned)c);
}

/* Shapes utf8 and builds each glyph's rings in the text frame. */
static bool shape_text(struct gp_font *font, const char *utf8,
		       const struct gp_text_style *style, double scale,
		       struct gp_text *out, const struct gp_where *where,
		       struct gp_diag *diag)
{
	bool ok = false;
	hb_buffer_t *buffer = hb_buffer_create();
	hb_buffer_add_utf8(buffer, utf8, -1, 0, -1);
	hb_buffer_guess_segment_properties(buffer);
	hb_feature_t no_kern;
	hb_feature_from_string("-kern", -1, &no_kern);
	hb_shape(font->hb, buffer, style->kerning ? NULL : &no_kern,
		 style->kerning ? 0 : 1);
	if (!hb_buffer_allocation_successful(buffer)) {
		gp_diag_oom(diag, where);
		goto out;
	}
	unsigned count = 0;
	hb_glyph_info_t *info = hb_buffer_get_glyph_infos(buffer, &count);
	hb_glyph_position_t *pos =
		hb_buffer_get_glyph_positions(buffer, &count);
	int64_t pen = 0; /* 26.6 font units */
	for (unsigned i = 0; i < count; i++) {
		if (info[i].codepoint == 0) {
			missing_glyph(font, utf8, info[i].cluster, where, diag);
			goto out;
		}
		struct gp_glyph *glyph;
		if (!add_glyph(out, &glyph)) {
			gp_diag_oom(diag, where);
			goto out;
		}
		glyph->glyph = info[i].codepoint;
		glyph->cluster = info[i].cluster;
		double spacing = (double)style->spacing * i;
		struct builder b = {
			.scale = scale,
			.ox = (double)(pen + pos[i].x_offset) * scale + spacing,
			.oy = (double)pos[i].y_offset * scale,
			.tolerance = (double)style->chord_tolerance,
		};
		glyph->pen_x = llround((double)pen * scale + spacing);
		glyph->advance = llround((double)pos[i].x_advance * scale);
		if (!outline_glyph(font, glyph, &b, where, diag))
			goto out;
		/* a letter (not a mark joined to one) with ink but no width
		 * would overlap the next: a broken hmtx table */
		bool starts_cluster = i == 0 ||
				      info[i].cluster != info[i - 1].cluster;
		if (starts_cluster && glyph->ring_count &&
		    pos[i].x_advance <= 0 && i + 1 < count) {
			no_advance(font, utf8, info[i].cluster, where, diag);
			goto out;
		}
		pen += pos[i].x_advance;
	}
	out->advance = llround((double)pen * scale +
			       (double)style->spacing * (count ? count - 1 : 0));
	ok = true;
out:
	hb_buffer_destroy(buffer);
	return ok;
}

static struct gp_point place(struct gp_point p, struct gp_point pivot,
			     const struct gp_text_style *style,
			     struct gp_point anchor)
{
	int64_t x = p.x - pivot.x, y = p.y - pivot.y;
	if (style->mirror)
		x = -x;
	int64_t rx = x, ry = y;
	switch (style->rotation) {
	case 90: rx = -y, ry = x; break;
	case 180: rx = -x, ry = -y; break;
	case 270: rx = y, ry = -x; break;
	default: break;
	}
	return (struct gp_point){ anchor.x + rx, anchor.y + ry };
}

/* Moves the text from its own frame to the glass: the alignment point of
 * the ink box goes to anchor, after mirror and rotation about it. */
static void place_text(struct gp_text *out, const struct gp_text_style *style,
		       struct gp_point anchor)
{
	struct gp_box ink = gp_box_none();
	for (size_t i = 0; i < out->count; i++)
		ink = gp_box_union(ink, out->glyphs[i].bounds);
	struct gp_point pivot = { ink.x0, 0 };
	if (style->align == GP_TEXT_CENTRE)
		pivot.x = ink.x0 + (ink.x1 - ink.x0) / 2;
	else if (style->align == GP_TEXT_RIGHT)
		pivot.x = ink.x1;
	if (style->base == GP_TEXT_BOTTOM)
		pivot.y = ink.y0;
	else if (style->base == GP_TEXT_MIDDLE)
		pivot.y = ink.y0 + (ink.y1 - ink.y0) / 2;
	else if (style->base == GP_TEXT_TOP)
		pivot.y = ink.y1;
	out->bounds = gp_box_none();
	for (size_t i = 0; i < out->count; i++) {
		struct gp_glyph *g = &out->glyphs[i];
		for (size_t r = 0; r < g->ring_count; r++)
			for (size_t k = 0; k < g->rings[r].count; k++)
				g->rings[r].points[k] =
					place(g->rings[r].points[k], pivot,
					      style, anchor);
		g->bounds = rings_bounds(g->rings, g->ring_count);
		out->bounds = gp_box_union(out->bounds, g->bounds);
	}
}

bool gp_font_set_text(struct gp_font *font, const char *utf8,
		      const struct gp_text_style *style,
		      struct gp_point anchor, struct gp_text *out,
		      const struct gp_where *where, struct gp_diag *diag)
{
	gp_text_init(out);
	if (!check_style(font, style, where, diag) ||
	    !check_text(utf8, where, diag))
		return false;
	int upem = font->face->units_per_EM;
	/* nm per 26.6 unit, straight from the size asked for */
	double scale = style->cap_height > 0 ?
		(double)style->cap_height / (64.0 * font->cap_units) :
		(double)style->em_size / (64.0 * upem);
	out->em_size = llround(scale * 64.0 * upem);
	if (!shape_text(font, utf8, style, scale, out, where, diag))
		goto fail;
	bool ink = false;
	for (size_t i = 0; i < out->count; i++)
		ink = ink || out->glyphs[i].ring_count > 0;
	if (!ink) {
		gp_diag_error(diag, where, "text '%s' has nothing to draw "
			      "(only spaces); expected visible characters",
			      utf8);
		goto fail;
	}
	place_text(out, style, anchor);
	return true;
fail:
	gp_text_finish(out);
	return false;
}

/* --- normalising through GEOS ---------------------------------------------- */

bool gp_glyph_polygons(struct gp_geos *geos, const struct gp_glyph *glyph,
		       struct gp_polyset *out)
{
	if (glyph->ring_count == 0)
		return true;
	return gp_geos_make_valid(geos, glyph->rings, glyph->ring_count,
				  glyph->even_odd ? GP_FILL_EVEN_ODD :
						    GP_FILL_NONZERO,
				  out);
}

bool gp_text_polygons(struct gp_geos *geos, const struct gp_text *text,
		      struct gp_polyset *out)
{
	struct gp_polyset all;
	gp_polyset_init(&all);
	bool ok = true;
	for (size_t i = 0; ok && i < text->count; i++)
		ok = gp_glyph_polygons(geos, &text->glyphs[i], &all);
	/* letters may touch or overlap (tight kerning, joined scripts) */
	if (ok)
		ok = gp_geos_union_set(geos, &all, out);
	gp_polyset_finish(&all);
	return ok;
}
