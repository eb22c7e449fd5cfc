/* Font module against FreeType and HarfBuzz themselves: glyph bounds
 * against FT_Outline_Get_BBox, areas against FreeType's anti-aliased
 * rasteriser, kerning against HarfBuzz's own shaping, holes counted, and
 * the errors a description can cause.
 *
 * Reference font: Liberation Sans Bold from the Debian package
 * fonts-liberation2 (SIL Open Font License). */
#include "font.h"
#include "geos.h"

#include <ft2build.h>
#include FT_FREETYPE_H
#include FT_OUTLINE_H
#include FT_BBOX_H
#include FT_ADVANCES_H
#include FT_TRUETYPE_TABLES_H
#include <hb-ft.h>
#include <hb.h>

#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#define FONT "Liberation Sans:bold"
#define NM_PER_MM 1e6
#define CAP INT64_C(3000000)  /* 3 mm cap height */
#define TOL INT64_C(1000)     /* 1 um chord tolerance */

static const struct gp_where where = { "test.yaml", 7, 3 };

/* A FreeType face of its own, opened on the file the module resolved, so
 * the reference does not share state with the code under test. */
struct reference {
	FT_Library library;
	FT_Face face;
	double nm_per_unit;   /* at CAP cap height */
};

static void reference_open(struct reference *ref, const char *file)
{
	assert_int_equal(FT_Init_FreeType(&ref->library), 0);
	assert_int_equal(FT_New_Face(ref->library, file, 0, &ref->face), 0);
	TT_OS2 *os2 = FT_Get_Sfnt_Table(ref->face, FT_SFNT_OS2);
	assert_non_null(os2);
	assert_true(os2->sCapHeight > 0);
	ref->nm_per_unit = (double)CAP / os2->sCapHeight;
}

static void reference_close(struct reference *ref)
{
	FT_Done_Face(ref->face);
	FT_Done_FreeType(ref->library);
}

static struct gp_font *open_font(struct gp_diag *diag)
{
	struct gp_font *font = gp_font_open(FONT, NULL, &where, diag);
	if (!font)
		for (size_t i = 0; i < diag->count; i++)
			fprintf(stderr, "%s\n", diag->entries[i].message);
	assert_non_null(font);
	return font;
}

static void set(struct gp_font *font, const char *text,
		const struct gp_text_style *style, struct gp_point anchor,
		struct gp_text *out, struct gp_diag *diag)
{
	bool ok = gp_font_set_text(font, text, style, anchor, out, &where,
				   diag);
	if (!ok)
		for (size_t i = 0; i < diag->count; i++)
			fprintf(stderr, "%s\n", diag->entries[i].message);
	assert_true(ok);
}

static void test_resolves_font(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = open_font(&diag);
	assert_non_null(strstr(gp_font_file(font), "LiberationSans-Bold"));
	assert_string_equal(gp_font_family(font), "Liberation Sans");
	assert_string_equal(gp_font_style(font), "Bold");
	assert_int_equal(gp_font_face_index(font), 0);
	/* the same file opened by path gives the same face */
	char *file = strdup(gp_font_file(font));
	gp_font_destroy(font);
	font = gp_font_open(file, NULL, &where, &diag);
	assert_non_null(font);
	assert_string_equal(gp_font_style(font), "Bold");
	gp_font_destroy(font);
	free(file);
	assert_int_equal(diag.count, 0);
	gp_diag_finish(&diag);
}

/* Each glyph's flattened bounds against FreeType's exact outline box
 * (FT_Outline_Get_BBox, which follows the curves' extrema), scaled to nm:
 * vertices lie on the curve, so the polygon's box is inside FreeType's
 * and short of it by at most the chord tolerance (+1 nm rounding). */
static void test_bbox_against_freetype(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = open_font(&diag);
	struct reference ref;
	reference_open(&ref, gp_font_file(font));
	struct gp_text_style style;
	gp_text_style_init(&style);
	style.cap_height = CAP;
	style.chord_tolerance = TOL;
	const char *letters[] = { "A", "O", "B", "8", "%", "a", "e", "g", "Q",
				  "@", "&", "s", "S", "C", "j", "3" };
	for (size_t i = 0; i < sizeof(letters) / sizeof(letters[0]); i++) {
		struct gp_text text;
		set(font, letters[i], &style, (struct gp_point){ 0, 0 }, &text,
		    &diag);
		assert_int_equal(text.count, 1);
		FT_UInt g = FT_Get_Char_Index(ref.face,
					      (FT_ULong)letters[i][0]);
		assert_int_equal(g, text.glyphs[0].glyph);
		assert_int_equal(FT_Load_Glyph(ref.face, g, FT_LOAD_NO_SCALE),
				 0);
		FT_BBox box;
		FT_Outline_Get_BBox(&ref.face->glyph->outline, &box);
		double k = ref.nm_per_unit;
		struct gp_box b = text.bounds;
		/* left-aligned on the ink box, baseline at y = 0 */
		double want_w = (double)(box.xMax - box.xMin) * k;
		double want_y0 = (double)box.yMin * k;
		double want_y1 = (double)box.yMax * k;
		double got_w = (double)(b.x1 - b.x0);
		assert_true(got_w <= want_w + 2);
		assert_true(got_w >= want_w - 2.0 * TOL - 2);
		assert_true(b.y0 >= want_y0 - 1 && b.y0 <= want_y0 + TOL + 1);
		assert_true(b.y1 <= want_y1 + 1 && b.y1 >= want_y1 - TOL - 1);
		gp_text_finish(&text);
	}
	reference_close(&ref);
	gp_font_destroy(font);
	gp_diag_finish(&diag);
}

/* A coarser tolerance must still hold against FreeType's box and must
 * use fewer points. */
static void test_tolerance_controls_points(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = open_font(&diag);
	struct reference ref;
	reference_open(&ref, gp_font_file(font));
	struct gp_text_style style;
	gp_text_style_init(&style);
	style.cap_height = CAP;
	size_t points[2];
	int64_t tolerances[2] = { 1000, 20000 };
	for (int t = 0; t < 2; t++) {
		style.chord_tolerance = tolerances[t];
		struct gp_text text;
		set(font, "O", &style, (struct gp_point){ 0, 0 }, &text, &diag);
		points[t] = 0;
		for (size_t r = 0; r < text.glyphs[0].ring_count; r++)
			points[t] += text.glyphs[0].rings[r].count;
		FT_Load_Glyph(ref.face, text.glyphs[0].glyph, FT_LOAD_NO_SCALE);
		FT_BBox box;
		FT_Outline_Get_BBox(&ref.face->glyph->outline, &box);
		double want_y1 = (double)box.yMax * ref.nm_per_unit;
		assert_true(text.bounds.y1 <= want_y1 + 1);
		assert_true(text.bounds.y1 >= want_y1 - tolerances[t] - 1);
		gp_text_finish(&text);
	}
	assert_true(points[1] < points[0]);
	reference_close(&ref);
	gp_font_destroy(font);
	gp_diag_finish(&diag);
}

/* "AV" is kerned in Liberation Sans Bold.  The set text's advance must be
 * FreeType's unkerned advances (FT_Get_Advance) plus the adjustment that
 * HarfBuzz reports when shaping with and without the kern feature. */
static void test_kerning_against_harfbuzz(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = open_font(&diag);
	struct reference ref;
	reference_open(&ref, gp_font_file(font));

	FT_Fixed adv_a, adv_v;
	FT_UInt ga = FT_Get_Char_Index(ref.face, 'A');
	FT_UInt gv = FT_Get_Char_Index(ref.face, 'V');
	FT_Get_Advance(ref.face, ga, FT_LOAD_NO_SCALE, &adv_a);
	FT_Get_Advance(ref.face, gv, FT_LOAD_NO_SCALE, &adv_v);

	/* HarfBuzz with its own OpenType functions (not the FreeType ones the
	 * module uses), at its default scale: positions in font units */
	hb_face_t *hb_face = hb_ft_face_create_referenced(ref.face);
	hb_font_t *hb = hb_font_create(hb_face);
	hb_face_destroy(hb_face);
	assert_int_equal(hb_font_get_face(hb) != NULL, 1);
	hb_position_t sums[2];
	for (int kern = 0; kern < 2; kern++) {
		hb_buffer_t *buffer = hb_buffer_create();
		hb_buffer_add_utf8(buffer, "AV", -1, 0, -1);
		hb_buffer_guess_segment_properties(buffer);
		hb_feature_t off;
		hb_feature_from_string("-kern", -1, &off);
		hb_shape(hb, buffer, kern ? NULL : &off, kern ? 0 : 1);
		unsigned n;
		hb_glyph_position_t *pos =
			hb_buffer_get_glyph_positions(buffer, &n);
		assert_int_equal(n, 2);
		sums[kern] = pos[0].x_advance + pos[1].x_advance;
		hb_buffer_destroy(buffer);
	}
	hb_font_destroy(hb);
	hb_position_t kern_units = sums[1] - sums[0];
	assert_true(kern_units < 0); /* A and V are pulled together */
	assert_int_equal(sums[0], adv_a + adv_v);

	struct gp_text_style style;
	gp_text_style_init(&style);
	style.cap_height = CAP;
	struct gp_text kerned, plain;
	set(font, "AV", &style, (struct gp_point){ 0, 0 }, &kerned, &diag);
	style.kerning = false;
	set(font, "AV", &style, (struct gp_point){ 0, 0 }, &plain, &diag);
	double k = ref.nm_per_unit;
	assert_true(llabs(plain.advance -
			  llround((double)(adv_a + adv_v) * k)) <= 1);
	assert_true(llabs(kerned.advance - plain.advance -
			  llround(kern_units * k)) <= 2);
	assert_true(kerned.bounds.x1 - kerned.bounds.x0 <
		    plain.bounds.x1 - plain.bounds.x0);
	/* the V moved by the same amount */
	assert_true(llabs(kerned.glyphs[1].pen_x - plain.glyphs[1].pen_x -
			  llround(kern_units * k)) <= 2);
	gp_text_finish(&kerned);
	gp_text_finish(&plain);
	reference_close(&ref);
	gp_font_destroy(font);
	gp_diag_finish(&diag);
}

/* Letter spacing adds exactly (n - 1) * spacing to the advance. */
static void test_spacing(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = open_font(&diag);
	struct gp_text_style style;
	gp_text_style_init(&style);
	style.cap_height = CAP;
	struct gp_text a, b;
	set(font, "REC", &style, (struct gp_point){ 0, 0 }, &a, &diag);
	style.spacing = 250000;
	set(font, "REC", &style, (struct gp_point){ 0, 0 }, &b, &diag);
	assert_true(llabs(b.advance - a.advance - 2 * 250000) <= 1);
	assert_true(llabs(b.glyphs[2].pen_x - a.glyphs[2].pen_x - 500000) <=
		    1);
	gp_text_finish(&a);
	gp_text_finish(&b);
	gp_font_destroy(font);
	gp_diag_finish(&diag);
}

/* Rotation and mirror are exact integer moves of the unrotated points
 * about the anchor; alignment puts the ink box where asked. */
static void test_rotation_mirror_alignment(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = open_font(&diag);
	struct gp_text_style style;
	gp_text_style_init(&style);
	style.cap_height = CAP;
	struct gp_text base;
	set(font, "kPa", &style, (struct gp_point){ 0, 0 }, &base, &diag);
	assert_int_equal(base.bounds.x0, 0);
	const struct gp_point anchor = { 10000000, -5000000 };
	for (int rot = 0; rot < 360; rot += 90) {
		for (int mirror = 0; mirror < 2; mirror++) {
			struct gp_text t;
			style.rotation = rot;
			style.mirror = mirror;
			set(font, "kPa", &style, anchor, &t, &diag);
			for (size_t g = 0; g < t.count; g++)
				for (size_t r = 0; r < t.glyphs[g].ring_count;
				     r++) {
					const struct gp_ring *want =
						&base.glyphs[g].rings[r];
					const struct gp_ring *got =
						&t.glyphs[g].rings[r];
					assert_int_equal(want->count,
							 got->count);
					for (size_t i = 0; i < got->count;
					     i++) {
						int64_t x = want->points[i].x;
						int64_t y = want->points[i].y;
						if (mirror)
							x = -x;
						int64_t rx = rot == 0 ? x :
							rot == 90 ? -y :
							rot == 180 ? -x : y;
						int64_t ry = rot == 0 ? y :
							rot == 90 ? x :
							rot == 180 ? -y : -x;
						assert_int_equal(
							got->points[i].x,
							anchor.x + rx);
						assert_int_equal(
							got->points[i].y,
							anchor.y + ry);
					}
				}
			gp_text_finish(&t);
		}
	}
	style.rotation = 0;
	style.mirror = false;
	static const struct {
		enum gp_text_align align;
		enum gp_text_base base;
	} cases[] = {
		{ GP_TEXT_CENTRE, GP_TEXT_MIDDLE },
		{ GP_TEXT_RIGHT, GP_TEXT_TOP },
		{ GP_TEXT_LEFT, GP_TEXT_BOTTOM },
	};
	for (size_t i = 0; i < 3; i++) {
		struct gp_text t;
		style.align = cases[i].align;
		style.base = cases[i].base;
		set(font, "kPa", &style, anchor, &t, &diag);
		struct gp_box b = t.bounds;
		int64_t ax = cases[i].align == GP_TEXT_LEFT ? b.x0 :
			     cases[i].align == GP_TEXT_RIGHT ? b.x1 :
			     (b.x0 + b.x1) / 2;
		int64_t ay = cases[i].base == GP_TEXT_BOTTOM ? b.y0 :
			     cases[i].base == GP_TEXT_TOP ? b.y1 :
			     (b.y0 + b.y1) / 2;
		assert_true(llabs(ax - anchor.x) <= 1);
		assert_true(llabs(ay - anchor.y) <= 1);
		gp_text_finish(&t);
	}
	gp_text_finish(&base);
	gp_font_destroy(font);
	gp_diag_finish(&diag);
}

/* Sizing by em: the em is the font's units per em scaled; sizing by cap
 * height gives the same shapes when the em matches. */
static void test_em_size(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = open_font(&diag);
	struct gp_text_style style;
	gp_text_style_init(&style);
	style.cap_height = CAP;
	struct gp_text a, b;
	set(font, "H", &style, (struct gp_point){ 0, 0 }, &a, &diag);
	/* H is flat topped: its height is the cap height (OS/2 sCapHeight) */
	assert_true(llabs(a.bounds.y1 - a.bounds.y0 - CAP) <= 1);
	style.cap_height = 0;
	style.em_size = a.em_size;
	set(font, "H", &style, (struct gp_point){ 0, 0 }, &b, &diag);
	assert_true(llabs(b.bounds.y1 - a.bounds.y1) <= 2);
	assert_true(llabs(b.bounds.x1 - a.bounds.x1) <= 2);
	gp_text_finish(&a);
	gp_text_finish(&b);
	gp_font_destroy(font);
	gp_diag_finish(&diag);
}

/* --- through GEOS: valid polygons, holes and areas ---------------------- */

static void text_polygons(struct gp_font *font, const char *utf8,
			  int64_t cap, struct gp_polyset *out,
			  struct gp_geos *geos, struct gp_diag *diag)
{
	struct gp_text_style style;
	gp_text_style_init(&style);
	style.cap_height = cap;
	struct gp_text text;
	set(font, utf8, &style, (struct gp_point){ 0, 0 }, &text, diag);
	gp_polyset_init(out);
	assert_true(gp_text_polygons(geos, &text, out));
	gp_text_finish(&text);
}

static size_t hole_count(const struct gp_polyset *set)
{
	size_t n = 0;
	for (size_t i = 0; i < set->count; i++)
		n += set->items[i].hole_count;
	return n;
}

/* Polygons and holes of glyphs whose topology anyone can see. */
static void test_holes(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_geos *geos = gp_geos_create(&diag);
	struct gp_font *font = open_font(&diag);
	static const struct {
		const char *text;
		size_t polygons, holes;
	} cases[] = {
		{ "O", 1, 1 }, { "B", 1, 2 }, { "8", 1, 2 }, { "A", 1, 1 },
		{ "%", 3, 2 }, { "a", 1, 1 }, { "i", 2, 0 }, { "H", 1, 0 },
		{ "OB", 2, 3 }, { "°C", 2, 1 },
	};
	for (size_t i = 0; i < sizeof(cases) / sizeof(cases[0]); i++) {
		struct gp_polyset set;
		text_polygons(font, cases[i].text, CAP, &set, geos, &diag);
		if (set.count != cases[i].polygons ||
		    hole_count(&set) != cases[i].holes)
			fail_msg("'%s': %zu polygons, %zu holes", cases[i].text,
				 set.count, hole_count(&set));
		gp_polyset_finish(&set);
	}
	gp_font_destroy(font);
	gp_geos_destroy(geos);
	assert_int_equal(diag.errors, 0);
	gp_diag_finish(&diag);
}

/* Area of FreeType's own anti-aliased rendering (FT_Render_Glyph, normal
 * mode: each pixel's coverage in 0..255) of one glyph at ppem pixels per
 * em, in font units squared. */
static double rendered_area_units2(FT_Face face, FT_UInt glyph, int ppem)
{
	assert_int_equal(FT_Set_Pixel_Sizes(face, 0, (FT_UInt)ppem), 0);
	assert_int_equal(FT_Load_Glyph(face, glyph, FT_LOAD_NO_HINTING |
					   FT_LOAD_NO_BITMAP), 0);
	assert_int_equal(FT_Render_Glyph(face->glyph, FT_RENDER_MODE_NORMAL),
			 0);
	const FT_Bitmap *bm = &face->glyph->bitmap;
	double sum = 0;
	for (unsigned y = 0; y < bm->rows; y++)
		for (unsigned x = 0; x < bm->width; x++)
			sum += bm->buffer[(size_t)y * (size_t)abs(bm->pitch) +
					  x];
	double px = sum / 255.0;
	double units_per_px = (double)face->units_per_EM / ppem;
	return px * units_per_px * units_per_px;
}

static void test_area_against_freetype_render(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_geos *geos = gp_geos_create(&diag);
	struct gp_font *font = open_font(&diag);
	struct reference ref;
	reference_open(&ref, gp_font_file(font));
	const char *letters = "AOB8%aegQ@&sW";
	for (const char *p = letters; *p; p++) {
		char text[2] = { *p, 0 };
		struct gp_polyset set;
		text_polygons(font, text, CAP, &set, geos, &diag);
		double area;
		assert_true(gp_geos_area_mm2(geos, &set, &area));
		FT_UInt g = FT_Get_Char_Index(ref.face, (FT_ULong)*p);
		double units2 = rendered_area_units2(ref.face, g, 2048);
		double want = units2 * ref.nm_per_unit * ref.nm_per_unit /
			      (NM_PER_MM * NM_PER_MM);
		if (fabs(area - want) > 0.01 * want)
			fail_msg("'%s': area %.6f mm2, FreeType %.6f mm2", text,
				 area, want);
		gp_polyset_finish(&set);
	}
	reference_close(&ref);
	gp_font_destroy(font);
	gp_geos_destroy(geos);
	gp_diag_finish(&diag);
}

/* --- errors a description can cause ----------------------------------- */

static void expect_message(const struct gp_diag *diag, const char *part)
{
	for (size_t i = 0; i < diag->count; i++)
		if (strstr(diag->entries[i].message, part) &&
		    strncmp(diag->entries[i].message, "test.yaml:7:3: ",
			    15) == 0)
			return;
	for (size_t i = 0; i < diag->count; i++)
		fprintf(stderr, "got: %s\n", diag->entries[i].message);
	fail_msg("no message containing '%s'", part);
}

static void test_missing_font(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	assert_null(gp_font_open("Nosuch Glassface Sans:bold", NULL, &where,
				 &diag));
	expect_message(&diag, "font 'Nosuch Glassface Sans:bold' not found: "
			      "fontconfig has no family 'Nosuch Glassface "
			      "Sans'");
	gp_diag_finish(&diag);
	gp_diag_init(&diag);
	assert_null(gp_font_open("fonts/none.ttf", "/nonexistent", &where,
				 &diag));
	expect_message(&diag, "cannot read '/nonexistent/fonts/none.ttf'");
	gp_diag_finish(&diag);
}

/* Pattern forms with no family (fontconfig's FcNameParse syntax,
 * "families-sizes:name=value:..."): fontconfig would match any font, so
 * each is refused with its place, never looked up. */
static void test_pattern_without_family(void **state)
{
	static const char *forms[] = {
		":", "::::", ":lang=zh", ":bold", ":style=Bold", "-12",
		"-12:weight=200", ":family=", ",",
	};
	for (size_t i = 0; i < sizeof(forms) / sizeof(*forms); i++) {
		struct gp_diag diag;
		gp_diag_init(&diag);
		assert_null(gp_font_open(forms[i], NULL, &where, &diag));
		assert_int_equal(diag.errors, 1);
		expect_message(&diag, "names no family");
		gp_diag_finish(&diag);
	}
}

static char *write_temp(const char *name, const char *content)
{
	char *path = malloc(256);
	snprintf(path, 256, "/tmp/gp-test-font-%d-%s", (int)getpid(), name);
	FILE *f = fopen(path, "w");
	assert_non_null(f);
	fputs(content, f);
	fclose(f);
	return path;
}

/* A BDF font holds bitmaps only; FreeType reads it (its bdf driver) and
 * reports it as not scalable. */
static void test_bitmap_font(void **state)
{
	static const char bdf[] =
		"STARTFONT 2.1\n"
		"FONT -test-dots-medium-r-normal--8-80-75-75-c-80-iso10646-1\n"
		"SIZE 8 75 75\nFONTBOUNDINGBOX 8 8 0 0\n"
		"STARTPROPERTIES 2\nFONT_ASCENT 8\nFONT_DESCENT 0\n"
		"ENDPROPERTIES\nCHARS 1\nSTARTCHAR A\nENCODING 65\n"
		"SWIDTH 500 0\nDWIDTH 8 0\nBBX 8 8 0 0\nBITMAP\n"
		"18\n24\n42\n42\n7E\n42\n42\n00\nENDCHAR\nENDFONT\n";
	char *path = write_temp("dots.bdf", bdf);
	struct gp_diag diag;
	gp_diag_init(&diag);
	assert_null(gp_font_open(path, NULL, &where, &diag));
	expect_message(&diag, "has only bitmaps; glass artwork needs an "
			      "outline font");
	gp_diag_finish(&diag);
	unlink(path);
	free(path);

	path = write_temp("junk.ttf", "not a font\n");
	gp_diag_init(&diag);
	assert_null(gp_font_open(path, NULL, &where, &diag));
	expect_message(&diag, "is not a font FreeType can read");
	gp_diag_finish(&diag);
	unlink(path);
	free(path);
}

static void test_missing_glyph(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = open_font(&diag);
	struct gp_text_style style;
	gp_text_style_init(&style);
	style.cap_height = CAP;
	struct gp_text text;
	assert_false(gp_font_set_text(font, "T\xe4\xb8\xad", &style,
				      (struct gp_point){ 0, 0 }, &text, &where,
				      &diag));
	expect_message(&diag, "has no glyph for '\xe4\xb8\xad' (U+4E2D)");
	assert_int_equal(text.count, 0);
	gp_font_destroy(font);
	gp_diag_finish(&diag);
}

static void test_bad_sizes(void **state)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = open_font(&diag);
	struct gp_text_style style;
	struct gp_text text;
	const int64_t caps[] = { 0, -1000000 };
	for (int i = 0; i < 2; i++) {
		gp_text_style_init(&style);
		style.cap_height = caps[i];
		assert_false(gp_font_set_text(font, "REC", &style,
					      (struct gp_point){ 0, 0 },
					      &text, &where, &diag));
		expect_message(&diag, "text size must be positive");
		gp_diag_finish(&diag);
	}
	gp_text_style_init(&style);
	style.em_size = -5;
	assert_false(gp_font_set_text(font, "REC", &style,
				      (struct gp_point){ 0, 0 }, &text, &where,
				      &diag));
	expect_message(&diag, "text size must be positive");
	gp_diag_finish(&diag);
	gp_text_style_init(&style);
	style.cap_height = CAP;
	assert_false(gp_font_set_text(font, "", &style,
				      (struct gp_point){ 0, 0 }, &text, &where,
				      &diag));
	expect_message(&diag, "text is empty");
	gp_diag_finish(&diag);
	assert_false(gp_font_set_text(font, "  ", &style,
				      (struct gp_point){ 0, 0 }, &text, &where,
				      &diag));
	expect_message(&diag, "has nothing to draw");
	gp_diag_finish(&diag);
	style.chord_tolerance = 0;
	assert_false(gp_font_set_text(font, "A", &style,
				      (struct gp_point){ 0, 0 }, &text, &where,
				      &diag));
	expect_message(&diag, "chord tolerance must be at least");
	gp_font_destroy(font);
	gp_diag_finish(&diag);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_resolves_font),
		cmocka_unit_test(test_bbox_against_freetype),
		cmocka_unit_test(test_tolerance_controls_points),
		cmocka_unit_test(test_kerning_against_harfbuzz),
		cmocka_unit_test(test_spacing),
		cmocka_unit_test(test_rotation_mirror_alignment),
		cmocka_unit_test(test_em_size),
		cmocka_unit_test(test_holes),
		cmocka_unit_test(test_area_against_freetype_render),
		cmocka_unit_test(test_missing_font),
		cmocka_unit_test(test_pattern_without_family),
		cmocka_unit_test(test_bitmap_font),
		cmocka_unit_test(test_missing_glyph),
		cmocka_unit_test(test_bad_sizes),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
