/* Segment digits.  Geometry is measured with GEOS (GEOSDistance, GEOSArea)
 * against the stated parameters; drive assignments against the pin-count
 * formula of each scheme; the artwork through the independent Gerber
 * reader gerbv.  Randomised cases print their seed so that a failing one
 * can be replayed alone (GP_TEST_SEED=n). */
#include "digits.h"
#include "geos.h"
#include "patch.h"
#include "units.h"

#include <inttypes.h>
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#define MM INT64_C(1000000)
#define UM INT64_C(1000)

struct fixture {
	struct gp_diag diag;
	struct gp_geos *geos;
};

static int setup(void **state)
{
	struct fixture *f = calloc(1, sizeof(*f));
	assert_non_null(f);
	gp_diag_init(&f->diag);
	f->geos = gp_geos_create(&f->diag);
	assert_non_null(f->geos);
	*state = f;
	return 0;
}

static int teardown(void **state)
{
	struct fixture *f = *state;
	gp_geos_destroy(f->geos);
	gp_diag_finish(&f->diag);
	free(f);
	return 0;
}

static double distance(struct fixture *f, const struct gp_polygon *a,
		       const struct gp_polygon *b)
{
	struct gp_geos_shape *sa = gp_geos_shape_from_polygon(f->geos, a);
	struct gp_geos_shape *sb = gp_geos_shape_from_polygon(f->geos, b);
	double d = -1;
	assert_non_null(sa);
	assert_non_null(sb);
	assert_true(gp_geos_shape_distance(f->geos, sa, sb, &d));
	gp_geos_shape_destroy(f->geos, sa);
	gp_geos_shape_destroy(f->geos, sb);
	return d;
}

/* Neighbours of each figure, written out by hand from the figure drawings
 * (not from the construction code). */
static const char *const adjacent7[] = {
	"a b", "a f", "b c", "b g", "c d", "c g", "d e", "e f", "e g", "f g",
	NULL,
};
static const char *const adjacent14[] = {
	"a b",   "a f",   "b c",   "c d",  "d e",  "e f",  "f g1", "e g1",
	"b g2",  "c g2",  "g1 g2", "a i",  "i g1", "i g2", "h i",  "i j",
	"d l",   "g1 l",  "g2 l",  "k l",  "l m",  "a h",  "f h",  "g1 h",
	"a j",   "b j",   "g2 j",  "d k",  "e k",  "g1 k", "d m",  "c m",
	"g2 m",  NULL,
};
static const char *const adjacent16[] = {
	"a1 a2", "d1 d2", "a1 f",  "a2 b",  "d1 e", "d2 c", "a1 i", "a2 i",
	"d1 l",  "d2 l",  "a1 h",  "a2 j",  "d1 k", "d2 m", "b c",  "e f",
	"f g1",  "e g1",  "b g2",  "c g2",  "g1 g2", "i g1", "i g2", "h i",
	"i j",   "g1 l",  "g2 l",  "k l",   "l m",  "f h",  "g1 h", "b j",
	"g2 j",  "e k",   "g1 k",  "c m",   "g2 m", NULL,
};

static bool is_adjacent(enum gp_figure fig, const char *a, const char *b)
{
	const char *const *list = fig == GP_FIGURE_7    ? adjacent7
				  : fig == GP_FIGURE_14 ? adjacent14
							: adjacent16;
	char x[8], y[8];
	for (size_t i = 0; list[i]; i++) {
		sscanf(list[i], "%7s %7s", x, y);
		if ((!strcmp(x, a) && !strcmp(y, b)) ||
		    (!strcmp(x, b) && !strcmp(y, a)))
			return true;
	}
	return false;
}

static unsigned test_seed(unsigned fallback)
{
	const char *s = getenv("GP_TEST_SEED");
	return s ? (unsigned)strtoul(s, NULL, 10) : fallback;
}

/* xorshift, so the cases do not depend on the C library's rand() */
static uint32_t next(uint32_t *s)
{
	*s ^= *s << 13;
	*s ^= *s >> 17;
	*s ^= *s << 5;
	return *s;
}

static int64_t pick(uint32_t *s, int64_t lo, int64_t hi)
{
	return lo + (int64_t)(next(s) % (uint64_t)(hi - lo + 1));
}

/* A figure of ordinary proportions: height 4..12 mm, width about 0.55 to
 * 0.7 of it, stroke about 1/8 to 1/12 of the height, gap 0.04..0.2 mm,
 * slant 0..15 degrees either way. */
static struct gp_figure_spec random_spec(uint32_t *s, enum gp_figure fig,
					 enum gp_ends ends)
{
	struct gp_figure_spec sp;
	sp.figure = fig;
	sp.ends = ends;
	sp.height = pick(s, 4 * MM, 12 * MM);
	sp.width = sp.height * pick(s, 55, 70) / 100;
	/* 14 and 16 segments put three strokes across: thinner ones */
	if (fig == GP_FIGURE_7)
		sp.stroke = sp.height / pick(s, 8, 12) + pick(s, 0, 999);
	else
		sp.stroke = sp.height / pick(s, 13, 16) + pick(s, 0, 999);
	/* gaps up to a third of the stroke, as drawn in practice */
	int64_t most = sp.stroke / 3 < 200 * UM ? sp.stroke / 3 : 200 * UM;
	sp.gap = pick(s, 40 * UM, most) + pick(s, 0, 1);
	sp.slant = (double)pick(s, -150, 150) / 10.0;
	if (fig != GP_FIGURE_7)
		sp.width = sp.height * pick(s, 62, 75) / 100;
	return sp;
}

/* Every pair of neighbouring segments is exactly the gap apart (within
 * 1 nm, GEOS distance), every other pair at least that. */
static void check_gaps(struct fixture *f, const struct gp_figure_spec *sp,
		       unsigned seed)
{
	struct gp_polygon seg[GP_FIGURE_MAX_SEGMENTS];
	struct gp_point origin = { 12345678, -3456789 };
	assert_true(gp_figure_check(sp, "test", NULL, &f->diag));
	if (!gp_figure_build(sp, origin, seg, &f->diag))
		fail_msg("seed %u: %s", seed, f->diag.entries[f->diag.count - 1].message);
	size_t n = gp_figure_segment_count(sp->figure);
	for (size_t i = 0; i < n; i++) {
		for (size_t j = i + 1; j < n; j++) {
			const char *a = gp_figure_segment_name(sp->figure, i);
			const char *b = gp_figure_segment_name(sp->figure, j);
			double d = distance(f, &seg[i], &seg[j]);
			double g = (double)sp->gap;
			bool adj = is_adjacent(sp->figure, a, b);
			if ((adj && fabs(d - g) > 1.0) || (!adj && d < g - 1.0))
				fail_msg("seed %u figure %d ends %d slant %g: "
					 "%s-%s %.3f nm, gap %.0f nm", seed,
					 (int)sp->figure, (int)sp->ends,
					 sp->slant, a, b, d, g);
		}
	}
	for (size_t i = 0; i < n; i++)
		gp_polygon_finish(&seg[i]);
}

static void test_gaps(void **state)
{
	struct fixture *f = *state;
	unsigned seed0 = test_seed(20261201);
	for (unsigned k = 0; k < 60; k++) {
		unsigned seed = seed0 + k;
		uint32_t s = seed * 2654435761u + 1;
		enum gp_figure fig = (enum gp_figure)(k % 3);
		enum gp_ends ends = (enum gp_ends)((k / 3) % 2);
		struct gp_figure_spec sp = random_spec(&s, fig, ends);
		if (k % 6 < 3)
			sp.slant = 0;
		check_gaps(f, &sp, seed);
	}
}

/* Stroke of a segment: the diameter of the largest circle inside it
 * (bisection on the GEOS inward offset being empty; for a convex polygon
 * the inward offset is exact, no arcs). */
static double stroke_width(struct fixture *f, const struct gp_polygon *p)
{
	struct gp_geos_shape *s = gp_geos_shape_from_polygon(f->geos, p);
	assert_non_null(s);
	struct gp_box b = gp_polygon_bounds(p);
	int64_t lo = 0, hi = gp_box_width(b) + gp_box_height(b);
	while (hi - lo > 1) {
		int64_t mid = (lo + hi) / 2;
		struct gp_geos_shape *e = gp_geos_shape_offset(
			f->geos, s, -mid, GP_JOIN_MITRE, 1000);
		assert_non_null(e);
		bool empty = gp_geos_shape_is_empty(f->geos, e) ||
			     gp_geos_shape_area_mm2(f->geos, e) <= 0;
		gp_geos_shape_destroy(f->geos, e);
		if (empty)
			hi = mid;
		else
			lo = mid;
	}
	gp_geos_shape_destroy(f->geos, s);
	return 2.0 * (double)lo;
}

/* Direction of the longest edge, degrees from the y axis. */
static double width_across_longest(const struct gp_polygon *p, double *angle)
{
	const struct gp_ring *r = &p->outer;
	size_t best = 0;
	double best_len = -1;
	for (size_t i = 0; i < r->count; i++) {
		struct gp_point a = r->points[i], b = r->points[(i + 1) % r->count];
		double len = hypot((double)(b.x - a.x), (double)(b.y - a.y));
		if (len > best_len) {
			best_len = len;
			best = i;
		}
	}
	struct gp_point a = r->points[best], b = r->points[(best + 1) % r->count];
	double dx = (double)(b.x - a.x) / best_len, dy = (double)(b.y - a.y) / best_len;
	double most = 0;
	for (size_t i = 0; i < r->count; i++) {
		double d = fabs((double)(r->points[i].x - a.x) * dy -
				(double)(r->points[i].y - a.y) * dx);
		most = fmax(most, d);
	}
	if (angle)
		*angle = atan2(dx, dy) * 180 / 3.14159265358979323846;
	return most;
}

/* Slant: heights exact, strokes their width across, side edges at the
 * slant angle. */
static void test_slant(void **state)
{
	struct fixture *f = *state;
	unsigned seed0 = test_seed(7);
	for (unsigned k = 0; k < 30; k++) {
		unsigned seed = seed0 + k;
		uint32_t s = seed * 2246822519u + 3;
		enum gp_figure fig = (enum gp_figure)(k % 3);
		struct gp_figure_spec sp =
			random_spec(&s, fig, (enum gp_ends)((k / 3) % 2));
		assert_true(gp_figure_check(&sp, "test", NULL, &f->diag));
		struct gp_polygon seg[GP_FIGURE_MAX_SEGMENTS];
		struct gp_point o = { -5 * MM, 7 * MM };
		assert_true(gp_figure_build(&sp, o, seg, &f->diag));
		size_t n = gp_figure_segment_count(fig);
		struct gp_box all = gp_box_none();
		for (size_t i = 0; i < n; i++) {
			all = gp_box_union(all, gp_polygon_bounds(&seg[i]));
			double angle;
			width_across_longest(&seg[i], &angle);
			double w = stroke_width(f, &seg[i]);
			/* both sides rounded to the 1 nm grid, each end
			 * within 0.71 nm of its line, and the bisection
			 * stops at 1 nm of radius: 3 nm */
			if (fabs(w - (double)sp.stroke) > 3.0)
				fail_msg("seed %u: segment %s is %.3f nm across, "
					 "stroke %" PRId64, seed,
					 gp_figure_segment_name(fig, i), w,
					 sp.stroke);
			/* uprights: longest edge is a side edge */
			const char *name = gp_figure_segment_name(fig, i);
			if (strchr("bcef", name[0]) && name[1] == 0) {
				double lean = angle > 90 ? angle - 180
					      : angle < -90 ? angle + 180
							    : angle;
				if (fabs(lean - sp.slant) > 1e-4)
					fail_msg("seed %u: side of %s leans %.6f "
						 "degrees, slant %g", seed, name,
						 lean, sp.slant);
			}
		}
		assert_int_equal(all.y0, o.y);
		assert_int_equal(all.y1, o.y + sp.height);
		for (size_t i = 0; i < n; i++)
			gp_polygon_finish(&seg[i]);
	}
}

/* Decimal point: its clearance from the digit is the stated gap, to within
 * the chord tolerance (vertices on the circle, chords inside it). */
static void test_point_gap(void **state)
{
	struct fixture *f = *state;
	for (int k = 0; k < 12; k++) {
		uint32_t s = 99u + (uint32_t)k * 7919u;
		struct gp_figure_spec sp = random_spec(
			&s, GP_FIGURE_7, (enum gp_ends)(k % 2));
		enum gp_dot_shape shape = (enum gp_dot_shape)((k / 2) % 2);
		int64_t size = sp.stroke, gap = sp.gap, tol = 1000;
		struct gp_point o = { 3 * MM, 2 * MM };
		struct gp_polygon seg[7], dot;
		assert_true(gp_figure_build(&sp, o, seg, &f->diag));
		struct gp_point c = gp_point_default_centre(&sp, o, shape, size,
							    gap);
		assert_true(gp_dot_build(shape, size, sp.slant, c, tol, &dot));
		double d = fmin(distance(f, &dot, &seg[2]),
				distance(f, &dot, &seg[3]));
		double slack = shape == GP_DOT_ROUND ? (double)tol + 1.0 : 1.0;
		if (d < (double)gap - 1.0 || d > (double)gap + slack)
			fail_msg("case %d: point %.3f nm from the digit, gap %"
				 PRId64, k, d, gap);
		struct gp_box b = gp_polygon_bounds(&dot);
		assert_true(b.y0 >= o.y - 1 && b.y0 <= o.y + 1);
		for (int i = 0; i < 7; i++)
			gp_polygon_finish(&seg[i]);
		gp_polygon_finish(&dot);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(test_gaps, setup, teardown),
		cmocka_unit_test_setup_teardown(test_slant, setup, teardown),
		cmocka_unit_test_setup_teardown(test_point_gap, setup,
						teardown),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
