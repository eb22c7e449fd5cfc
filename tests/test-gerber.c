/* Tests of the Gerber writer.
 *
 * "Spec" means the Gerber Layer Format Specification, Ucamco, revision
 * 2024.05; section numbers are from it (from memory: the rules are the
 * spec's, a number may be off by a subsection).  Files are read back with the
 * strict reader in gerber-read.c (which names the section of each rule it
 * enforces), compared with GEOS, and rendered by the independent reader
 * gerbv 2.9 (gerbv-render.c). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <cmocka.h>

#include "artwork.h"
#include "buffer.h"
#include "diag.h"
#include "geos.h"
#include "gerber-read.h"
#include "gerber.h"
#include "gerbv-render.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

__extension__ typedef __int128 wide;

#define MM INT64_C(1000000)

static const struct gp_gerber_info info = { "GX-1001", "0.1.0", NULL };

/* --- building artwork ---------------------------------------------------- */

static struct gp_shape *add_box(struct gp_artwork *art, enum gp_layer layer,
				enum gp_role role, int64_t x0, int64_t y0,
				int64_t x1, int64_t y1)
{
	struct gp_shape *s = gp_artwork_add_box(
		art, layer, role, GP_NET_NONE, gp_box_make(x0, y0, x1, y1));
	assert_non_null(s);
	return s;
}

static void ring_of(struct gp_ring *ring, const int64_t *xy, size_t n)
{
	gp_ring_init(ring);
	for (size_t i = 0; i < n; i++)
		assert_true(gp_ring_push(ring, xy[2 * i], xy[2 * i + 1]));
}

static void add_hole(struct gp_polygon *poly, const int64_t *xy, size_t n)
{
	struct gp_ring hole;
	ring_of(&hole, xy, n);
	assert_true(gp_polygon_add_hole(poly, &hole));
}

static struct gp_shape *add_path(struct gp_artwork *art, const int64_t *xy,
				 size_t n, int64_t width, bool open)
{
	struct gp_polygon poly;
	gp_polygon_init(&poly);
	ring_of(&poly.outer, xy, n);
	struct gp_shape *s = gp_artwork_add_shape(
		art, GP_LAYER_FRONT_ITO, GP_ROLE_LEAD, GP_NET_NONE, &poly);
	assert_non_null(s);
	s->line_width = width;
	s->open_path = open;
	return s;
}

/* A 20 x 10 mm plate with a square hole (2..8 mm) and a triangular one. */
static void holed_plate(struct gp_polygon *poly)
{
	static const int64_t square[] = { 2 * MM, 2 * MM, 8 * MM, 2 * MM,
					  8 * MM, 8 * MM, 2 * MM, 8 * MM };
	static const int64_t triangle[] = { 10 * MM, 2 * MM, 17 * MM, 5 * MM,
					    11 * MM, 8 * MM };
	gp_polygon_init(poly);
	assert_true(gp_polygon_set_box(poly, gp_box_make(0, 0, 20 * MM,
							 10 * MM)));
	add_hole(poly, square, 4);
	add_hole(poly, triangle, 3);
}

/* --- writing and reading back -------------------------------------------- */

static char *write_layer(const struct gp_artwork *art, enum gp_layer layer,
			 const struct gp_gerber_info *with)
{
	struct gp_buffer out;
	gp_buffer_init(&out);
	const char *why = NULL;
	if (!gp_gerber_write_why(&out, art, layer, with, &why))
		fail_msg("gp_gerber_write: %s", why ? why : "?");
	char *text = strdup(out.data);
	gp_buffer_finish(&out);
	assert_non_null(text);
	return text;
}

static void read_back(const char *text, struct gr_file *file)
{
	if (!gr_read(text, strlen(text), file))
		fail_msg("written file breaks the spec: %s\n%s", file->error,
			 text);
}

static void write_and_read(const struct gp_artwork *art, enum gp_layer layer,
			   struct gr_file *file)
{
	char *text = write_layer(art, layer, &info);
	read_back(text, file);
	free(text);
}

/* --- contour checks, independent of the writer's code -------------------- */

static wide orient(struct gp_point o, struct gp_point a, struct gp_point b)
{
	return (wide)(a.x - o.x) * (b.y - o.y) - (wide)(a.y - o.y) * (b.x - o.x);
}

static wide area2(const struct gp_ring *r)
{
	wide sum = 0;
	for (size_t i = 1; i + 1 < r->count; i++)
		sum += orient(r->points[0], r->points[i], r->points[i + 1]);
	return sum;
}

static wide wabs(wide v)
{
	return v < 0 ? -v : v;
}

static bool same(struct gp_point a, struct gp_point b)
{
	return a.x == b.x && a.y == b.y;
}

static bool within(struct gp_point a, struct gp_point b, struct gp_point p)
{
	return orient(a, b, p) == 0 &&
	       (p.x - a.x) * (wide)(p.x - b.x) <= 0 &&
	       (p.y - a.y) * (wide)(p.y - b.y) <= 0;
}

static int sgn(wide v)
{
	return (v > 0) - (v < 0);
}

static bool touch(struct gp_point a, struct gp_point b, struct gp_point c,
		  struct gp_point d)
{
	int d1 = sgn(orient(c, d, a)), d2 = sgn(orient(c, d, b));
	int d3 = sgn(orient(a, b, c)), d4 = sgn(orient(a, b, d));
	if (d1 * d2 < 0 && d3 * d4 < 0)
		return true;
	return within(c, d, a) || within(c, d, b) || within(a, b, c) ||
	       within(a, b, d);
}

/* Spec 4.10.3: a contour may not cross or overlap itself; the only
 * exception is a cut-in, a pair of fully coincident segments run in
 * opposite directions.  Neighbouring segments share only their joint. */
static void assert_valid_contour(const struct gp_ring *r)
{
	size_t n = r->count;
	assert_true(n >= 3);
	for (size_t i = 0; i < n; i++) {
		struct gp_point a = r->points[i], b = r->points[(i + 1) % n];
		assert_false(same(a, b)); /* no zero-length segment */
		for (size_t j = i + 1; j < n; j++) {
			struct gp_point c = r->points[j];
			struct gp_point d = r->points[(j + 1) % n];
			bool next = j == i + 1, wrap = i == 0 && j == n - 1;
			if (next || wrap) {
				/* only the shared joint, no doubling back */
				struct gp_point far = next ? d : c;
				struct gp_point near_a = next ? a : b;
				if (within(a, b, far) || within(c, d, near_a))
					fail_msg("segments %zu and %zu fold "
						 "back", i, j);
				continue;
			}
			if (!touch(a, b, c, d))
				continue;
			if (same(a, d) && same(b, c))
				continue; /* a cut-in pair */
			/* touching at a shared vertex only is allowed when
			 * it is where cut-ins meet the rings */
			if ((same(a, c) || same(a, d) || same(b, c) ||
			     same(b, d)) &&
			    !within(a, b, same(a, c) || same(b, c) ? d : c) &&
			    !within(c, d, same(a, c) || same(a, d) ? b : a))
				continue;
			fail_msg("segments %zu and %zu cross or overlap", i, j);
		}
	}
}

static struct gp_box ring_bounds(const struct gp_ring *r)
{
	struct gp_box box = gp_box_none();
	for (size_t i = 0; i < r->count; i++)
		box = gp_box_union(box, gp_box_make(r->points[i].x,
						    r->points[i].y,
						    r->points[i].x,
						    r->points[i].y));
	return box;
}

static bool ring_has(const struct gp_ring *r, struct gp_point p)
{
	for (size_t i = 0; i < r->count; i++)
		if (same(r->points[i], p))
			return true;
	return false;
}

/* The read-back contour of a region against the polygon it came from:
 * valid (spec 4.10.3), the exact area (outer minus holes, in nm^2), every
 * vertex kept, and, as GEOS reads it (even-odd), the same point set. */
static void assert_region_is(const struct gp_ring *contour,
			     const struct gp_polygon *poly)
{
	assert_valid_contour(contour);
	wide want = wabs(area2(&poly->outer));
	for (size_t i = 0; i < poly->hole_count; i++)
		want -= wabs(area2(&poly->holes[i]));
	assert_true(wabs(area2(contour)) == want);
	for (size_t i = 0; i < poly->outer.count; i++)
		assert_true(ring_has(contour, poly->outer.points[i]));
	for (size_t h = 0; h < poly->hole_count; h++)
		for (size_t i = 0; i < poly->holes[h].count; i++)
			assert_true(ring_has(contour,
					     poly->holes[h].points[i]));

	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_geos *geos = gp_geos_create(&diag);
	assert_non_null(geos);
	struct gp_polyset read, intended, extra, missing;
	gp_polyset_init(&read);
	gp_polyset_init(&intended);
	gp_polyset_init(&extra);
	gp_polyset_init(&missing);
	struct gp_polygon copy;
	assert_true(gp_polygon_copy(&copy, poly));
	assert_true(gp_polyset_take(&intended, &copy));
	assert_true(gp_geos_make_valid(geos, contour, 1, GP_FILL_EVEN_ODD,
				       &read));
	assert_true(gp_geos_difference(geos, &read, &intended, &extra));
	assert_true(gp_geos_difference(geos, &intended, &read, &missing));
	double a_read, a_intended, a_extra, a_missing;
	assert_true(gp_geos_area_mm2(geos, &read, &a_read));
	assert_true(gp_geos_area_mm2(geos, &intended, &a_intended));
	assert_true(gp_geos_area_mm2(geos, &extra, &a_extra));
	assert_true(gp_geos_area_mm2(geos, &missing, &a_missing));
	/* GEOS: same area, nothing extra, nothing missing */
	assert_true(fabs(a_read - a_intended) < 1e-9);
	assert_true(a_extra < 1e-9 && a_missing < 1e-9);
	gp_polyset_finish(&read);
	gp_polyset_finish(&intended);
	gp_polyset_finish(&extra);
	gp_polyset_finish(&missing);
	gp_geos_destroy(geos);
	gp_diag_finish(&diag);
}

/* --- syntax and header ------------------------------------------------- */

/* Spec 4.2 (FS, MO before coordinates), 5.6 (file attributes), 4.3 (at
 * least one aperture), 4.13 (M02 last). */
static void test_header(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	add_box(&art, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, 0, 0, MM,
		2 * MM);
	char *text = write_layer(&art, GP_LAYER_FRONT_ITO, &info);
	struct gr_file f;
	read_back(text, &f);
	assert_string_equal(gr_attribute(&f, ".GenerationSoftware"),
			    "glassplot,glassplot,0.1.0");
	assert_string_equal(gr_attribute(&f, ".FileFunction"),
			    "Other,front-ito");
	assert_string_equal(gr_attribute(&f, ".FilePolarity"), "Positive");
	assert_string_equal(gr_attribute(&f, ".Part"), "Single");
	assert_string_equal(gr_attribute(&f, ".SameCoordinates"), "GX-1001");
	assert_null(gr_attribute(&f, ".CreationDate"));
	assert_true(f.aperture_count >= 1);
	assert_int_equal(f.object_count, 1);
	assert_int_equal(f.objects[0].kind, GR_REGION);
	/* the FS line comes first after the opening comment */
	assert_non_null(strstr(text, "*\n%FSLAX46Y46*%\n%MOMM*%\n"));
	size_t n = strlen(text);
	assert_string_equal(text + n - 5, "M02*\n");
	gr_file_finish(&f);
	free(text);
	gp_artwork_finish(&art);
}

/* The reader used above must reject what the spec forbids, or the syntax
 * checks prove nothing. */
static void test_reader_rejects(void **state)
{
	static const char *const bad[] = {
		/* no M02 (4.13) */
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\n",
		/* trailing zero omission (deprecated, 8) */
		"%FSTAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\nM02*\n",
		/* aperture used before it is defined (4.6) */
		"%FSLAX46Y46*%\n%MOMM*%\nD10*\n%ADD10C,0.1*%\nM02*\n",
		/* coordinate without D code (deprecated, 8.3) */
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\nD10*\nG01*\n"
		"X0Y0D02*\nX5Y5*\nM02*\n",
		/* open contour (4.10.3) */
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\nG01*\nG36*\n"
		"X0Y0D02*\nX5Y0D01*\nX5Y5D01*\nG37*\nM02*\n",
		/* zero-length contour segment (4.10.3) */
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\nG01*\nG36*\n"
		"X0Y0D02*\nX5Y0D01*\nX5Y0D01*\nX5Y5D01*\nX0Y0D01*\nG37*\n"
		"M02*\n",
		/* G54 (deprecated, 8) */
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\nG54D10*\nM02*\n",
		/* clear polarity (not written) */
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\n%LPC*%\nM02*\n",
		/* 11 digits (4.6 holds 10) */
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\nD10*\n"
		"X12345678901Y0D03*\nM02*\n",
		/* draw with a rectangle (deprecated, 8) */
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10R,0.1X0.1*%\nD10*\nG01*\n"
		"X0Y0D02*\nX5Y5D01*\nM02*\n",
		/* object attributes (gerbv complains about them) */
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\n%TO.N,SEG1*%\n"
		"M02*\n",
		/* data after M02 (4.13) */
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\nM02*\nG01*\n",
	};
	for (size_t i = 0; i < sizeof(bad) / sizeof(bad[0]); i++) {
		struct gr_file f;
		if (gr_read(bad[i], strlen(bad[i]), &f))
			fail_msg("reader accepted bad file %zu", i);
		gr_file_finish(&f);
	}
	static const char good[] =
		"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\nD10*\nG01*\n"
		"X0Y0D02*\nX5Y5D01*\nG36*\nX0Y0D02*\nX5Y0D01*\nX5Y5D01*\n"
		"X0Y0D01*\nG37*\nM02*\n";
	struct gr_file f;
	assert_true(gr_read(good, strlen(good), &f));
	assert_int_equal(f.object_count, 2);
	gr_file_finish(&f);
}

static void test_creation_date(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	char date[32];
	/* reference values from GNU date: date -u -d @N +%FT%T */
	assert_true(gp_gerber_format_date(date, sizeof(date), 0));
	assert_string_equal(date, "1970-01-01T00:00:00+00:00");
	assert_true(gp_gerber_format_date(date, sizeof(date), 1700000000));
	assert_string_equal(date, "2023-11-14T22:13:20+00:00");
	assert_false(gp_gerber_format_date(date, 10, 0));
	assert_true(gp_gerber_format_date(date, sizeof(date), 1700000000));
	struct gp_gerber_info dated = { "GX-1001", "0.1.0", date };
	char *text = write_layer(&art, GP_LAYER_SEAL, &dated);
	struct gr_file f;
	read_back(text, &f);
	assert_string_equal(gr_attribute(&f, ".CreationDate"),
			    "2023-11-14T22:13:20+00:00");
	assert_string_equal(gr_attribute(&f, ".FileFunction"), "Other,seal");
	gr_file_finish(&f);
	free(text);
	gp_artwork_finish(&art);
}

/* Reserved characters in attribute values are escaped (spec 3.4.3), so a
 * part number cannot break the file. */
static void test_escapes(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	struct gp_gerber_info odd = { "GX,10*%\\1", NULL, NULL };
	char *text = write_layer(&art, GP_LAYER_FRONT_ITO, &odd);
	struct gr_file f;
	read_back(text, &f);
	assert_string_equal(gr_attribute(&f, ".SameCoordinates"),
			    "GX\\u002C10\\u002A\\u0025\\u005C1");
	assert_string_equal(gr_attribute(&f, ".GenerationSoftware"),
			    "glassplot,glassplot,0");
	gr_file_finish(&f);
	free(text);
	gp_artwork_finish(&art);
}

/* --- coordinates --------------------------------------------------------- */

/* Format 4.6 in mm (spec 4.2.2): the coordinate integer is the nanometre
 * value, so what is read back equals the artwork exactly. */
static void test_exact_coordinates(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	const int64_t pitch = 4123457; /* 4.123457 mm */
	for (int64_t i = 0; i < 1000; i++)
		add_box(&art, GP_LAYER_BACK_ITO, GP_ROLE_ELECTRODE,
			-3 * MM + i * pitch, -1, -3 * MM + i * pitch + 1234567,
			7654321);
	add_box(&art, GP_LAYER_BACK_ITO, GP_ROLE_ELECTRODE,
		-GP_GERBER_COORD_MAX, -GP_GERBER_COORD_MAX,
		GP_GERBER_COORD_MAX, -GP_GERBER_COORD_MAX + 1);
	struct gr_file f;
	write_and_read(&art, GP_LAYER_BACK_ITO, &f);
	assert_int_equal(f.object_count, 1001);
	for (size_t i = 0; i < 1001; i++) {
		const struct gp_ring *got = &f.objects[i].points;
		struct gp_box want = gp_polygon_bounds(&art.shapes[i].poly);
		struct gp_box box = ring_bounds(got);
		assert_int_equal(got->count, 4);
		assert_true(box.x0 == want.x0 && box.x1 == want.x1 &&
			    box.y0 == want.y0 && box.y1 == want.y1);
	}
	/* the 1000th cell sits at origin + 999 * pitch, to the nanometre */
	assert_true(ring_bounds(&f.objects[999].points).x0 ==
		    -3 * MM + 999 * pitch);
	gr_file_finish(&f);

	/* one nanometre beyond format 4.6 is refused, not rounded */
	add_box(&art, GP_LAYER_BACK_ITO, GP_ROLE_ELECTRODE, 0, 0,
		GP_GERBER_COORD_MAX + 1, 1);
	struct gp_buffer out;
	gp_buffer_init(&out);
	const char *why = NULL;
	assert_false(gp_gerber_write_why(&out, &art, GP_LAYER_BACK_ITO, &info,
					 &why));
	assert_non_null(why);
	assert_non_null(strstr(why, "4.6"));
	gp_buffer_finish(&out);
	gp_artwork_finish(&art);
}

/* Shapes of other layers stay out; an empty layer is still a complete
 * file with one aperture (spec 4.3) and M02. */
static void test_layers(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	add_box(&art, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, 0, 0, MM, MM);
	add_box(&art, GP_LAYER_BACK_ITO, GP_ROLE_ELECTRODE, 0, 0, 2 * MM,
		MM);
	add_box(&art, GP_LAYER_BACK_ITO, GP_ROLE_ELECTRODE, 0, 0, 3 * MM,
		MM);
	struct gr_file f;
	write_and_read(&art, GP_LAYER_BACK_ITO, &f);
	assert_int_equal(f.object_count, 2);
	gr_file_finish(&f);
	write_and_read(&art, GP_LAYER_TRANSFER, &f);
	assert_int_equal(f.object_count, 0);
	assert_int_equal(f.aperture_count, 1);
	gr_file_finish(&f);
	gp_artwork_finish(&art);
}

/* --- holes --------------------------------------------------------------- */

static void test_holes(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	struct gp_polygon plate, copy;
	holed_plate(&plate);
	assert_true(gp_polygon_copy(&copy, &plate));
	assert_non_null(gp_artwork_add_shape(&art, GP_LAYER_FRONT_ITO,
					     GP_ROLE_ELECTRODE, 0, &copy));
	char *text = write_layer(&art, GP_LAYER_FRONT_ITO, &info);
	/* holes by cut-ins, never by clear polarity (spec 4.9.2) */
	assert_null(strstr(text, "%LPC"));
	struct gr_file f;
	read_back(text, &f);
	assert_int_equal(f.object_count, 1);
	assert_region_is(&f.objects[0].points, &plate);
	gr_file_finish(&f);
	free(text);
	gp_polygon_finish(&plate);
	gp_artwork_finish(&art);
}

/* Rings in either orientation, with repeated points and an explicit
 * closing point, a hole whose ray meets a slanted edge off the grid, and
 * holes touching the outer ring or each other at one point (valid for
 * GEOS/OGC). */
static void test_hole_cases(void **state)
{
	static const int64_t outer_cw[] = { 0, 0, 0, 10 * MM, 10 * MM,
					    10 * MM, 10 * MM, 10 * MM,
					    13 * MM, 0, 0, 0 };
	static const int64_t hole_ccw[] = { 1 * MM, 1 * MM, 4 * MM, 1 * MM,
					    4 * MM, 4 * MM, 1 * MM, 4 * MM };
	/* ray from (7, 3) meets the slanted edge at x = 12.7 mm minus a
	 * third of a nanometre: off the grid, so a vertex is used */
	static const int64_t off_grid[] = { 6 * MM, 2 * MM, 7 * MM,
					    3 * MM - 1, 6 * MM, 4 * MM };
	static const int64_t touching[] = { 0, 5 * MM, 2 * MM, 6 * MM,
					    2 * MM, 7 * MM };
	/* two holes touching at a corner, the right one also touching the
	 * square hole's top edge from above at (3, 4) */
	static const int64_t corner_a[] = { 5 * MM, 8 * MM, 7 * MM, 8 * MM,
					    7 * MM, 9 * MM };
	static const int64_t corner_b[] = { 3 * MM, 6 * MM, 5 * MM, 8 * MM,
					    3 * MM, 8 * MM };
	static const int64_t on_edge[] = { 3 * MM, 4 * MM, 4 * MM, 5 * MM,
					   2 * MM, 5 * MM };
	struct gp_polygon poly;
	gp_polygon_init(&poly);
	ring_of(&poly.outer, outer_cw, 6);
	add_hole(&poly, hole_ccw, 4);
	add_hole(&poly, off_grid, 3);
	add_hole(&poly, touching, 3);
	add_hole(&poly, corner_a, 3);
	add_hole(&poly, corner_b, 3);
	add_hole(&poly, on_edge, 3);
	struct gp_ring contour;
	const char *why = NULL;
	if (!gp_gerber_join_holes(&contour, &poly, &why))
		fail_msg("join: %s", why ? why : "?");
	/* clean copy of the intended polygon for the comparison */
	struct gp_polygon clean;
	assert_true(gp_polygon_copy(&clean, &poly));
	gp_ring_clean(&clean.outer);
	assert_region_is(&contour, &clean);
	gp_polygon_finish(&clean);
	gp_ring_finish(&contour);

	/* overlapping holes cannot be joined: refused, not written wrong */
	static const int64_t crossing[] = { 2 * MM, 2 * MM, 5 * MM, 2 * MM,
					    5 * MM, 5 * MM };
	add_hole(&poly, crossing, 3);
	gp_ring_init(&contour);
	why = NULL;
	assert_false(gp_gerber_join_holes(&contour, &poly, &why));
	assert_non_null(why);
	gp_polygon_finish(&poly);

	/* a hole outside the outer ring is refused too */
	static const int64_t outside[] = { 20 * MM, 0, 22 * MM, 0, 21 * MM,
					   MM };
	assert_true(gp_polygon_set_box(&poly, gp_box_make(0, 0, 10 * MM,
							  10 * MM)));
	add_hole(&poly, outside, 3);
	why = NULL;
	assert_false(gp_gerber_join_holes(&contour, &poly, &why));
	assert_string_equal(why, "a hole lies outside its outer ring");
	gp_polygon_finish(&poly);
}

/* A seeded generator (a fixed LCG, Knuth MMIX constants) so one failing
 * iteration can be replayed alone. */
static uint64_t next_random(uint64_t *seed)
{
	*seed = *seed * 6364136223846793005u + 1442695040888963407u;
	return *seed >> 33;
}

static int64_t pick(uint64_t *seed, int64_t lo, int64_t hi)
{
	return lo + (int64_t)(next_random(seed) % (uint64_t)(hi - lo + 1));
}

/* Holes of several kinds in a grid of cells inside a plate whose right
 * edge leans, so rays meet vertices, vertical edges and slanted edges. */
static void random_plate(struct gp_polygon *poly, uint64_t seed)
{
	const int64_t cell = 3 * MM;
	int cols = (int)pick(&seed, 1, 5), rows = (int)pick(&seed, 1, 4);
	int64_t w = cols * cell + MM, h = rows * cell + MM;
	int64_t lean = pick(&seed, -MM / 2, MM);
	gp_polygon_init(poly);
	assert_true(gp_ring_push(&poly->outer, 0, 0));
	assert_true(gp_ring_push(&poly->outer, w + MM, 0));
	assert_true(gp_ring_push(&poly->outer, w + MM + lean, h));
	assert_true(gp_ring_push(&poly->outer, 0, h));
	for (int r = 0; r < rows; r++) {
		for (int c = 0; c < cols; c++) {
			int64_t x = MM / 2 + c * cell, y = MM / 2 + r * cell;
			int64_t m = cell / 10;
			int kind = (int)pick(&seed, 0, 4);
			if (kind == 0)
				continue;
			int64_t pts[12];
			size_t n;
			if (kind == 1) { /* rectangle, shared rows line up */
				int64_t t = pick(&seed, m, 3 * m);
				int64_t xy[] = { x + m, y + t, x + cell - m,
						 y + t, x + cell - m,
						 y + cell - t, x + m,
						 y + cell - t };
				memcpy(pts, xy, sizeof(xy));
				n = 4;
			} else if (kind == 2 || kind == 3) {
				/* triangle or quad, arbitrary vertices */
				n = (size_t)kind + 1;
				int64_t xy[] = {
					pick(&seed, x + m, x + cell / 2),
					pick(&seed, y + m, y + cell / 2),
					pick(&seed, x + cell / 2,
					     x + cell - m),
					pick(&seed, y + m, y + cell / 2),
					pick(&seed, x + cell / 2,
					     x + cell - m),
					pick(&seed, y + cell / 2,
					     y + cell - m),
					pick(&seed, x + m, x + cell / 2),
					pick(&seed, y + cell / 2,
					     y + cell - m),
				};
				memcpy(pts, xy, sizeof(xy));
				if (n == 3) { /* drop one corner */
					pts[4] = pts[6];
					pts[5] = pts[7];
				}
			} else { /* concave L whose notch faces +x */
				int64_t xy[] = { x + m, y + m, x + cell - m,
						 y + m, x + cell - m,
						 y + 2 * m, x + 3 * m,
						 y + 2 * m, x + 3 * m,
						 y + cell - m, x + m,
						 y + cell - m };
				memcpy(pts, xy, sizeof(xy));
				n = 6;
			}
			struct gp_ring hole;
			ring_of(&hole, pts, n);
			if (gp_ring_area2(&hole) == 0) {
				gp_ring_finish(&hole);
				continue;
			}
			assert_true(gp_polygon_add_hole(poly, &hole));
		}
	}
}

static void test_random_holes(void **state)
{
	for (uint64_t seed = 1; seed <= 300; seed++) {
		struct gp_polygon poly;
		random_plate(&poly, seed);
		struct gp_ring contour;
		const char *why = NULL;
		if (!gp_gerber_join_holes(&contour, &poly, &why))
			fail_msg("seed %llu: %s", (unsigned long long)seed,
				 why);
		assert_region_is(&contour, &poly);
		gp_ring_finish(&contour);
		gp_polygon_finish(&poly);
	}
}

/* --- apertures, strokes and flashes -------------------------------------- */

static void test_pads(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	add_box(&art, GP_LAYER_FRONT_ITO, GP_ROLE_PAD, 0, 0, 2 * MM, 4 * MM);
	add_box(&art, GP_LAYER_FRONT_ITO, GP_ROLE_PAD, 10 * MM, 0, 12 * MM,
		4 * MM);
	/* centre off the nanometre grid: a region, not a rounded flash */
	add_box(&art, GP_LAYER_FRONT_ITO, GP_ROLE_PAD, 0, 0, 2 * MM + 1,
		4 * MM);
	/* a slanted pad is a region too */
	static const int64_t diamond[] = { 0, MM, MM, 0, 2 * MM, MM, MM,
					   2 * MM };
	struct gp_polygon poly;
	gp_polygon_init(&poly);
	ring_of(&poly.outer, diamond, 4);
	assert_non_null(gp_artwork_add_shape(&art, GP_LAYER_FRONT_ITO,
					     GP_ROLE_PAD, 0, &poly));
	/* an electrode box is never flashed */
	add_box(&art, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, 0, 0, 2 * MM,
		4 * MM);
	struct gr_file f;
	write_and_read(&art, GP_LAYER_FRONT_ITO, &f);
	assert_int_equal(f.object_count, 5);
	assert_int_equal(f.objects[0].kind, GR_FLASH);
	assert_int_equal(f.objects[1].kind, GR_FLASH);
	assert_int_equal(f.objects[0].aperture, f.objects[1].aperture);
	const struct gr_aperture *a =
		gr_aperture_find(&f, f.objects[0].aperture);
	assert_non_null(a);
	assert_int_equal(a->kind, 'R');
	assert_true(a->a == 2 * MM && a->b == 4 * MM);
	assert_true(f.objects[0].points.points[0].x == MM &&
		    f.objects[0].points.points[0].y == 2 * MM);
	assert_true(f.objects[1].points.points[0].x == 11 * MM);
	assert_int_equal(f.objects[2].kind, GR_REGION);
	assert_int_equal(f.objects[3].kind, GR_REGION);
	assert_int_equal(f.objects[4].kind, GR_REGION);
	gr_file_finish(&f);
	gp_artwork_finish(&art);
}

static void test_strokes(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	static const int64_t open[] = { 0, 0, 5 * MM, 0, 5 * MM, 0,
					5 * MM, 3 * MM };
	static const int64_t closed[] = { 0, 0, 4 * MM, 0, 4 * MM, 2 * MM,
					  0, 2 * MM, 0, 0 };
	static const int64_t dot[] = { 7 * MM, 7 * MM, 7 * MM, 7 * MM };
	add_path(&art, open, 4, 150000, true);
	add_path(&art, closed, 5, 150000, false);
	add_path(&art, dot, 2, 300001, true);
	struct gr_file f;
	write_and_read(&art, GP_LAYER_FRONT_ITO, &f);
	assert_int_equal(f.object_count, 3);
	/* open: the repeated point dropped, no way back to the start */
	assert_int_equal(f.objects[0].kind, GR_DRAW);
	assert_int_equal(f.objects[0].points.count, 3);
	/* closed: ends exactly where it began, given closed or not */
	assert_int_equal(f.objects[1].kind, GR_DRAW);
	assert_int_equal(f.objects[1].points.count, 5);
	assert_true(same(f.objects[1].points.points[0],
			 f.objects[1].points.points[4]));
	assert_int_equal(f.objects[0].aperture, f.objects[1].aperture);
	const struct gr_aperture *a =
		gr_aperture_find(&f, f.objects[0].aperture);
	assert_true(a->kind == 'C' && a->a == 150000);
	/* a single point is a flash of the round aperture */
	assert_int_equal(f.objects[2].kind, GR_FLASH);
	a = gr_aperture_find(&f, f.objects[2].aperture);
	assert_true(a->kind == 'C' && a->a == 300001);
	gr_file_finish(&f);
	gp_artwork_finish(&art);
}

static void test_bad_shapes(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	static const int64_t flat[] = { 0, 0, MM, MM, 2 * MM, 2 * MM };
	struct gp_polygon poly;
	gp_polygon_init(&poly);
	ring_of(&poly.outer, flat, 3);
	assert_non_null(gp_artwork_add_shape(&art, GP_LAYER_FRONT_ITO,
					     GP_ROLE_ELECTRODE, 0, &poly));
	struct gp_buffer out;
	gp_buffer_init(&out);
	const char *why = NULL;
	assert_false(gp_gerber_write_why(&out, &art, GP_LAYER_FRONT_ITO,
					 &info, &why));
	assert_non_null(why);
	gp_buffer_finish(&out);
	gp_artwork_finish(&art);
}

/* Same input, same bytes: twice from one artwork and once from a copy
 * built separately (other addresses). */
static void test_determinism(void **state)
{
	struct gp_artwork a, b;
	gp_artwork_init(&a);
	gp_artwork_init(&b);
	for (int k = 0; k < 2; k++) {
		struct gp_artwork *art = k ? &b : &a;
		for (int i = 0; i < 20; i++) {
			struct gp_polygon poly;
			random_plate(&poly, (uint64_t)i + 1000);
			gp_polygon_translate(&poly, i * 30 * MM, 0);
			assert_non_null(gp_artwork_add_shape(
				art, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, 0,
				&poly));
			add_box(art, GP_LAYER_FRONT_ITO, GP_ROLE_PAD,
				i * MM, -5 * MM, i * MM + (i % 3 + 1) * 200000,
				-2 * MM);
		}
	}
	char *ta = write_layer(&a, GP_LAYER_FRONT_ITO, &info);
	char *tb = write_layer(&b, GP_LAYER_FRONT_ITO, &info);
	char *tc = write_layer(&a, GP_LAYER_FRONT_ITO, &info);
	assert_string_equal(ta, tb);
	assert_string_equal(ta, tc);
	free(ta);
	free(tb);
	free(tc);
	gp_artwork_finish(&a);
	gp_artwork_finish(&b);
}

/* --- the independent reader gerbv ------------------------------------- */

static void gerbv_file(const char *name, char *path, size_t size)
{
	const char *dir = getenv("GP_TEST_TMP");
	snprintf(path, size, "%s/%s", dir ? dir : ".", name);
}

static void save(const char *path, const char *text)
{
	FILE *f = fopen(path, "w");
	assert_non_null(f);
	assert_int_equal(fwrite(text, 1, strlen(text), f), strlen(text));
	assert_int_equal(fclose(f), 0);
}

static void render(const char *text, const char *name,
		   const struct gerbv_frame *frame, struct gerbv_result *r)
{
	char gbr[4096], png[4200], err[512];
	gerbv_file(name, gbr, sizeof(gbr));
	snprintf(png, sizeof(png), "%s.png", gbr);
	save(gbr, text);
	if (!gerbv_render(getenv("GERBV"), gbr, png, frame, r, err,
			  sizeof(err)))
		fail_msg("gerbv: %s", err);
}

/* The holed plate with an island inside its square hole, a flashed pad and
 * two strokes, rendered by gerbv: no complaint, the area and extent of the
 * intended artwork within the render resolution, and the holes open. */
static void test_gerbv_holes(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	/* the island comes first: clear polarity for the holes drawn after
	 * it would erase it; cut-ins leave it alone */
	add_box(&art, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, 3 * MM, 3 * MM,
		7 * MM, 7 * MM);
	struct gp_polygon plate;
	holed_plate(&plate);
	assert_non_null(gp_artwork_add_shape(&art, GP_LAYER_FRONT_ITO,
					     GP_ROLE_ELECTRODE, 0, &plate));
	add_box(&art, GP_LAYER_FRONT_ITO, GP_ROLE_PAD, 0, -5 * MM, 2 * MM,
		-MM);
	static const int64_t frame_path[] = { 0, 12 * MM, 20 * MM, 12 * MM,
					      20 * MM, 14 * MM, 0, 14 * MM };
	static const int64_t line[] = { 5 * MM, -3 * MM, 15 * MM, -3 * MM };
	const double w = 0.2, r = w / 2, pi = acos(-1.0);
	add_path(&art, frame_path, 4, 200000, false);
	add_path(&art, line, 2, 200000, true);

	/* intended area, mm^2: plate 200 - square hole 36 - triangle 19.5
	 * (shoelace), island 16, pad 8; closed stroke of a 20 x 2 rectangle:
	 * its offset by r (W H + 2 (W + H) r + pi r^2) minus the inner
	 * rectangle; the open line: a capsule, L w + pi r^2. */
	double stroke = 20 * 2 + 2 * 22 * r + pi * r * r -
			(20 - w) * (2 - w);
	double capsule = 10 * w + pi * r * r;
	double area = 200 - 36 - 19.5 + 16 + 8 + stroke + capsule;
	double triangle_edges = hypot(7, 3) + hypot(6, 3) + hypot(1, 6);
	double perimeter = 60 + 24 + triangle_edges + 16 + 12 +
			   (2 * 22 + 2 * pi * r) + 2 * (22 - 4 * w) +
			   (2 * 10 + 2 * pi * r);
	char *text = write_layer(&art, GP_LAYER_FRONT_ITO, &info);
	struct gerbv_frame frame = { -1, -6, 21, 15, 1000, 8 };
	struct gerbv_result res;
	render(text, "holes.gbr", &frame, &res);
	struct gerbv_expect expect = { area, perimeter, -r, -5, 20 + r,
				       14 + r, true };
	char why[4096];
	if (!gerbv_compare(&res, &expect, why, sizeof(why)))
		fail_msg("%s", why);
	assert_true(res.known_notes >= 5); /* one per %TF line */
	/* the check could fail: the tolerance is far below a hole's area */
	assert_true(perimeter * res.pixel_mm + res.pixel_mm * res.pixel_mm <
		    16);
	/* open holes, island and plate dark */
	assert_false(gerbv_result_dark_at(&res, 2.5, 5));
	assert_false(gerbv_result_dark_at(&res, 7.5, 5));
	assert_false(gerbv_result_dark_at(&res, 12.5, 5));
	assert_true(gerbv_result_dark_at(&res, 5, 5));
	assert_true(gerbv_result_dark_at(&res, 9, 5));
	assert_true(gerbv_result_dark_at(&res, 18, 5));
	assert_true(gerbv_result_dark_at(&res, 1, -3));
	gerbv_result_finish(&res);
	free(text);

	/* the same without holes must not pass for it */
	struct gp_shape *s = &art.shapes[1];
	for (size_t i = 0; i < s->poly.hole_count; i++)
		gp_ring_finish(&s->poly.holes[i]);
	s->poly.hole_count = 0;
	text = write_layer(&art, GP_LAYER_FRONT_ITO, &info);
	render(text, "no-holes.gbr", &frame, &res);
	assert_false(gerbv_compare(&res, &expect, why, sizeof(why)));
	gerbv_result_finish(&res);
	free(text);
	gp_artwork_finish(&art);
}

/* Random holed plates, as gerbv draws them: no complaint and the exact
 * area within the resolution. */
static void test_gerbv_random(void **state)
{
	for (uint64_t seed = 1; seed <= 12; seed++) {
		struct gp_artwork art;
		gp_artwork_init(&art);
		struct gp_polygon poly;
		random_plate(&poly, seed * 7919);
		double area = gp_polygon_area_mm2(&poly);
		double perimeter = 0;
		for (size_t h = 0; h <= poly.hole_count; h++) {
			const struct gp_ring *ring =
				h == 0 ? &poly.outer : &poly.holes[h - 1];
			for (size_t i = 0; i < ring->count; i++) {
				struct gp_point a = ring->points[i];
				struct gp_point b =
					ring->points[(i + 1) % ring->count];
				perimeter += hypot((double)(b.x - a.x),
						   (double)(b.y - a.y)) / 1e6;
			}
		}
		struct gp_box box = gp_polygon_bounds(&poly);
		assert_non_null(gp_artwork_add_shape(&art, GP_LAYER_BACK_ITO,
						     GP_ROLE_ELECTRODE, 0,
						     &poly));
		char *text = write_layer(&art, GP_LAYER_BACK_ITO, &info);
		struct gerbv_frame frame = { box.x0 / 1e6, box.y0 / 1e6,
					     box.x1 / 1e6, box.y1 / 1e6, 800,
					     8 };
		struct gerbv_result res;
		render(text, "random.gbr", &frame, &res);
		struct gerbv_expect expect = { area, perimeter, frame.x0,
					       frame.y0, frame.x1, frame.y1,
					       true };
		char why[4096];
		if (!gerbv_compare(&res, &expect, why, sizeof(why)))
			fail_msg("seed %llu: %s", (unsigned long long)seed,
				 why);
		gerbv_result_finish(&res);
		free(text);
		gp_artwork_finish(&art);
	}
}

/* The complaint filter lets through gerbv's %TF% note only: object
 * attributes, which the writer leaves out for this reason, are caught. */
static void test_gerbv_complaints(void **state)
{
	static const char with_to[] =
		"%FSLAX46Y46*%\n%MOMM*%\n%TF.Part,Single*%\n%ADD10C,0.1*%\n"
		"%TO.N,SEG1*%\nD10*\nX0Y0D03*\n%TD*%\nM02*\n";
	struct gerbv_frame frame = { -1, -1, 1, 1, 200, 4 };
	struct gerbv_result res;
	render(with_to, "object-attributes.gbr", &frame, &res);
	assert_int_equal(res.known_notes, 1);
	assert_non_null(strstr(res.complaints, "%TO%"));
	char why[4096];
	struct gerbv_expect none = { -1, 0, 0, 0, 0, 0, false };
	assert_false(gerbv_compare(&res, &none, why, sizeof(why)));
	gerbv_result_finish(&res);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_header),
		cmocka_unit_test(test_reader_rejects),
		cmocka_unit_test(test_creation_date),
		cmocka_unit_test(test_escapes),
		cmocka_unit_test(test_exact_coordinates),
		cmocka_unit_test(test_layers),
		cmocka_unit_test(test_holes),
		cmocka_unit_test(test_hole_cases),
		cmocka_unit_test(test_random_holes),
		cmocka_unit_test(test_pads),
		cmocka_unit_test(test_strokes),
		cmocka_unit_test(test_bad_shapes),
		cmocka_unit_test(test_determinism),
		cmocka_unit_test(test_gerbv_holes),
		cmocka_unit_test(test_gerbv_random),
		cmocka_unit_test(test_gerbv_complaints),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
