/* Fonts for icons.  A font is found through fontconfig ("Liberation
 * Sans:bold") or given as a file; text is shaped with HarfBuzz (glyph
 * choice, advances, kerning) and each glyph's unhinted FreeType outline is
 * flattened into rings in nanometres, in the glass frame.
 *
 * Lengths are int64_t nanometres, x right, y up.  The rings of a glyph are
 * the outline's contours as they are: they may overlap and their direction
 * is the font's; the fill rule (non-zero or even-odd) says what is inside.
 * gp_glyphs_to_polyset turns them into valid polygons with holes. */
#ifndef GP_FONT_H
#define GP_FONT_H

#include "diag.h"
#include "geom.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

struct gp_font;

/* Default chord tolerance for curve flattening: 1 um. */
#define GP_FONT_DEFAULT_TOLERANCE INT64_C(1000)
/* Smallest chord tolerance accepted: 10 nm (finer only costs points). */
#define GP_FONT_MIN_TOLERANCE INT64_C(10)
/* Longest text accepted for one icon, in bytes. */
#define GP_FONT_MAX_TEXT 256

/* Opens a font.  name is a file when it contains '/' (a relative file is
 * taken from base_dir when base_dir is not NULL), otherwise a fontconfig
 * pattern.  A pattern whose family fontconfig cannot find is an error (not
 * silently replaced by a fallback family); so is a bitmap-only font.
 * Errors are recorded at where.  Returns NULL on failure. */
struct gp_font *gp_font_open(const char *name, const char *base_dir,
			     const struct gp_where *where,
			     struct gp_diag *diag);
void gp_font_destroy(struct gp_font *font);

/* The resolved file, face index in it, family and style names (owned by
 * the font). */
const char *gp_font_file(const struct gp_font *font);
long gp_font_face_index(const struct gp_font *font);
const char *gp_font_family(const struct gp_font *font);
const char *gp_font_style(const struct gp_font *font);
int gp_font_units_per_em(const struct gp_font *font);
/* Cap height in font units: the OS/2 table's value when the font gives
 * one, otherwise the height of the letter H. */
int gp_font_cap_height_units(const struct gp_font *font);
enum gp_text_align {
	GP_TEXT_LEFT,
	GP_TEXT_CENTRE,
	GP_TEXT_RIGHT,
};

enum gp_text_base {
	GP_TEXT_BASELINE, /* the anchor is on the baseline */
	GP_TEXT_BOTTOM,   /* ... on the bottom of the ink box */
	GP_TEXT_MIDDLE,   /* ... half way up the ink box */
	GP_TEXT_TOP,      /* ... on the top of the ink box */
};

struct gp_text_style {
	int64_t cap_height;      /* > 0: size by cap height, nm */
	int64_t em_size;         /* used when cap_height is 0, nm */
	int64_t spacing;         /* added between letters, nm (may be < 0) */
	enum gp_text_align align;/* horizontal, against the ink box */
	enum gp_text_base base;  /* vertical */
	int rotation;            /* 0, 90, 180 or 270 degrees, anticlockwise */
	bool mirror;             /* mirror left-right (before rotating) */
	bool kerning;            /* apply the font's kerning */
	int64_t chord_tolerance; /* nm */
};

/* Defaults: no size (one must be set), no spacing, left, baseline, no
 * rotation or mirror, kerning on, 1 um tolerance. */
void gp_text_style_init(struct gp_text_style *style);

/* One glyph of a set text. */
struct gp_glyph {
	unsigned glyph;          /* glyph index in the font */
	unsigned cluster;        /* byte offset of its character in text */
	bool even_odd;           /* outline fill rule; else non-zero */
	struct gp_ring *rings;   /* flattened contours, glass frame */
	size_t ring_count, ring_capacity;
	struct gp_box bounds;    /* of the rings; empty for a space */
	/* HarfBuzz's numbers for this glyph, nm along the baseline before
	 * rotation and mirror: pen position and advance (kerning included) */
	int64_t pen_x, advance;
};

struct gp_text {
	struct gp_glyph *glyphs;
	size_t count;
	int64_t em_size;         /* the em that the style resolved to, nm */
	int64_t advance;         /* pen advance of the whole text, nm */
	struct gp_box bounds;    /* ink box in the glass frame */
};

void gp_text_init(struct gp_text *text);
void gp_text_finish(struct gp_text *text);

/* Shapes utf8 (one line, not empty) in font with style and flattens it
 * into out (initialised here), placed so that the alignment point is at
 * anchor.  A character the font has no glyph for, a size that is not
 * positive, or a tolerance below GP_FONT_MIN_TOLERANCE is an error at
 * where.  Returns false on failure (out is then empty). */
bool gp_font_set_text(struct gp_font *font, const char *utf8,
		      const struct gp_text_style *style,
		      struct gp_point anchor, struct gp_text *out,
		      const struct gp_where *where, struct gp_diag *diag);

struct gp_geos;

/* The glyphs of text as valid polygons with holes (through GEOS), each
 * glyph filled with its outline's own rule, all glyphs united; appended
 * to out (initialised by the caller).  False on a GEOS error. */
bool gp_text_polygons(struct gp_geos *geos, const struct gp_text *text,
		      struct gp_polyset *out);
/* The same for one glyph. */
bool gp_glyph_polygons(struct gp_geos *geos, const struct gp_glyph *glyph,
		       struct gp_polyset *out);

/* Decodes the UTF-8 character at s into *code; returns its length in
 * bytes, or 0 when s does not start with a valid character. */
size_t gp_utf8_decode(const char *s, uint32_t *code);

#endif
