/* Back patches: every lit area here is computed by GEOS (intersection of
 * the front shape with the shifted patch, GEOSArea), and compared with the
 * front shape's own area. */
#include "patch.h"
#include "units.h"

#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "fixtures.h"

#define MM INT64_C(1000000)
#define UM INT64_C(1000)

/* The tolerance the icon and digit issues ask for, mm^2. */
#define LIT_TOLERANCE 1e-6

static void poly_of(struct gp_polygon *p, const int64_t *xy, size_t n)
{
	gp_polygon_init(p);
	for (size_t i = 0; i < n; i++)
		assert_true(gp_ring_push(&p->outer, xy[2 * i], xy[2 * i + 1]));
	gp_polygon_normalize(p);
}

static void box_of(struct gp_polygon *p, int64_t x0, int64_t y0, int64_t x1,
		   int64_t y1)
{
	gp_polygon_init(p);
	assert_true(gp_polygon_set_box(p, gp_box_make(x0, y0, x1, y1)));
}

static void set_of(struct gp_polyset *set, const struct gp_polygon *polys,
		   size_t n)
{
	gp_polyset_init(set);
	for (size_t i = 0; i < n; i++) {
		struct gp_polygon copy;
		assert_true(gp_polygon_copy(&copy, &polys[i]));
		assert_true(gp_polyset_take(set, &copy));
	}
}

/* An icon-like group: a concave L, a triangle with slanted edges and a
 * ring (square with a square hole). */
enum { SAMPLE_COUNT = 3 };

static void sample_front(struct gp_polygon polys[SAMPLE_COUNT])
{
	static const int64_t l[] = { 0, 0, 2 * MM, 0, 2 * MM, 300 * UM,
				     300 * UM, 300 * UM, 300 * UM, 2 * MM,
				     0, 2 * MM };
	static const int64_t tri[] = { 3 * MM, 0, 5 * MM, 0, 3700 * UM,
				       1900 * UM };
	poly_of(&polys[0], l, 6);
	poly_of(&polys[1], tri, 3);
	box_of(&polys[2], 6 * MM, 0, 8 * MM, 2 * MM);
	struct gp_polygon hole;
	box_of(&hole, 6500 * UM, 500 * UM, 7500 * UM, 1500 * UM);
	assert_true(gp_polygon_add_hole(&polys[2], &hole.outer));
	gp_polygon_finish(&hole);
	gp_polygon_normalize(&polys[2]);
}

static void make_patch(struct fixture *f, const struct gp_polygon *front,
		       size_t n, int64_t margin, struct gp_polyset *patch)
{
	struct gp_patch_group group = { "icon SAMPLE", front, n };
	struct gp_patch_rules rules = { margin, 20 * UM, 30 * UM, UM, false };
	gp_polyset_init(patch);
	assert_true(gp_patch_make(f->geos, &group, 1, NULL, 0, &rules, patch,
				  &f->diag));
}

static void test_margin_covers_shifts(void **state)
{
	struct fixture *f = *state;
	struct gp_polygon front[SAMPLE_COUNT];
	sample_front(front);
	struct gp_polyset fset, patch;
	set_of(&fset, front, SAMPLE_COUNT);
	const int64_t margin = 50 * UM;
	make_patch(f, front, SAMPLE_COUNT, margin, &patch);
	/* front area by hand: L 2*0.3 + 0.3*1.7 = 1.11; triangle 2*1.9/2 =
	 * 1.9; ring 4 - 1 = 3 */
	const double hand = 1.11 + 1.9 + 3.0;
	/* shifts equal to the margin and below it */
	const int64_t shifts[] = { margin, margin / 2, 1 };
	for (size_t s = 0; s < 3; s++) {
		struct gp_registration reg;
		assert_true(gp_patch_registration(f->geos, &fset, &patch,
						  shifts[s], shifts[s], &reg));
		assert_true(fabs(reg.front_mm2 - hand) < 1e-9);
		for (int k = 0; k < GP_REGISTRATION_SHIFTS; k++)
			assert_true(fabs(reg.lit_mm2[k] - reg.front_mm2) <
				    LIT_TOLERANCE);
	}
	/* the patch is no larger than needed: every patch point is within
	 * the margin box of the front (patch minus front grown by margin
	 * plus 1 nm of snapping has no area) */
	struct gp_polyset grown, extra;
	gp_polyset_init(&grown);
	gp_polyset_init(&extra);
	assert_true(gp_geos_dilate_box(f->geos, &fset, margin + 1, margin + 1,
				       &grown));
	assert_true(gp_geos_difference(f->geos, &patch, &grown, &extra));
	assert_int_equal(extra.count, 0);
	gp_polyset_finish(&grown);
	gp_polyset_finish(&extra);
	gp_polyset_finish(&patch);
	gp_polyset_finish(&fset);
	for (int i = 0; i < SAMPLE_COUNT; i++)
		gp_polygon_finish(&front[i]);
	assert_int_equal(f->diag.count, 0);
}

static void test_small_margin_loses(void **state)
{
	struct fixture *f = *state;
	struct gp_polygon front[SAMPLE_COUNT];
	sample_front(front);
	struct gp_polyset fset, patch;
	set_of(&fset, front, SAMPLE_COUNT);
	make_patch(f, front, SAMPLE_COUNT, 40 * UM, &patch);
	struct gp_registration reg;
	assert_true(gp_patch_registration(f->geos, &fset, &patch, 50 * UM,
					  50 * UM, &reg));
	/* nominal still fully lit, every off-centre position loses */
	assert_true(fabs(reg.lit_mm2[4] - reg.front_mm2) < LIT_TOLERANCE);
	for (int k = 0; k < GP_REGISTRATION_SHIFTS; k++)
		if (k != 4)
			assert_true(reg.lit_mm2[k] <
				    reg.front_mm2 - LIT_TOLERANCE);
	/* a 10 um shortfall over the ring's 2 mm side loses at least
	 * 0.01 mm x 2 mm = 0.02 mm^2 (less the hole's share) */
	assert_true(reg.front_mm2 - reg.worst_mm2 > 0.02);
	assert_true(reg.worst != 4);
	gp_polyset_finish(&patch);
	gp_polyset_finish(&fset);
	for (int i = 0; i < SAMPLE_COUNT; i++)
		gp_polygon_finish(&front[i]);
}

static double overlap_mm2(struct fixture *f, const struct gp_polyset *a,
			  const struct gp_polygon *b)
{
	struct gp_polyset bs, out;
	set_of(&bs, b, 1);
	gp_polyset_init(&out);
	assert_true(gp_geos_intersection(f->geos, a, &bs, &out));
	double area = 0;
	assert_true(gp_geos_area_mm2(f->geos, &out, &area));
	gp_polyset_finish(&bs);
	gp_polyset_finish(&out);
	return area;
}

static void test_notch(void **state)
{
	struct fixture *f = *state;
	const int64_t margin = 100 * UM, clearance = 30 * UM;
	struct gp_polygon square, traces[2];
	box_of(&square, 0, 0, MM, MM);
	/* another segment's lead passing 50 um beside the square, through
	 * the margin ring, and the square's own lead leaving its bottom */
	box_of(&traces[0], MM + 50 * UM, -2 * MM, MM + 100 * UM, 3 * MM);
	box_of(&traces[1], 400 * UM, -2 * MM, 450 * UM, 0);
	struct gp_patch_group group = { "COM1", &square, 1 };
	struct gp_patch_rules rules = { margin, 20 * UM, clearance, UM, false };

	/* without notches both traces lie over the patch (so this test can
	 * see a missing notch) */
	struct gp_polyset plain;
	gp_polyset_init(&plain);
	assert_true(gp_patch_make(f->geos, &group, 1, NULL, 0, &rules, &plain,
				  &f->diag));
	assert_true(overlap_mm2(f, &plain, &traces[0]) > 0.004);
	assert_true(overlap_mm2(f, &plain, &traces[1]) > 0.004);

	struct gp_polyset patch;
	gp_polyset_init(&patch);
	assert_true(gp_patch_make(f->geos, &group, 1, traces, 2, &rules,
				  &patch, &f->diag));
	/* the foreign lead does not overlap and keeps the clearance */
	assert_true(overlap_mm2(f, &patch, &traces[0]) == 0.0);
	struct gp_polyset t0;
	set_of(&t0, &traces[0], 1);
	double d;
	assert_true(gp_geos_distance(f->geos, &patch, &t0, &d));
	assert_true(d >= (double)clearance - 1);
	/* the own lead overlaps only inside the square (not at all here,
	 * it ends on the square's edge) */
	assert_true(overlap_mm2(f, &patch, &traces[1]) == 0.0);
	/* the square itself stays fully covered */
	struct gp_polyset fset;
	set_of(&fset, &square, 1);
	struct gp_registration reg;
	assert_true(gp_patch_registration(f->geos, &fset, &patch, 0, 0, &reg));
	assert_true(fabs(reg.lit_mm2[4] - 1.0) < LIT_TOLERANCE);
	/* away from the notches the margin is whole: moving the back plate
	 * down by the margin keeps everything lit */
	assert_true(gp_patch_registration(f->geos, &fset, &patch, 0, margin,
					  &reg));
	assert_true(fabs(reg.lit_mm2[1] - 1.0) < LIT_TOLERANCE);
	/* moving it up uncovers the square's bottom edge where the own
	 * lead's notch is (50 um lead + 2 x 30 um clearance wide): the
	 * price of a notch, about 0.11 mm x 0.1 mm */
	assert_true(reg.lit_mm2[7] < 1.0 - 0.01);
	assert_true(reg.lit_mm2[7] > 1.0 - 0.0115);
	gp_polyset_finish(&t0);
	gp_polyset_finish(&fset);
	gp_polyset_finish(&plain);
	gp_polyset_finish(&patch);
	gp_polygon_finish(&square);
	gp_polygon_finish(&traces[0]);
	gp_polygon_finish(&traces[1]);
	assert_int_equal(f->diag.count, 0);
}

static void test_separation(void **state)
{
	struct fixture *f = *state;
	const int64_t margin = 50 * UM, space = 20 * UM, tol = UM;
	struct gp_polygon a, b;
	/* two segments of different commons, 100 um apart */
	box_of(&a, 0, 0, MM, MM);
	box_of(&b, MM + 100 * UM, 0, 2 * MM + 100 * UM, MM);
	struct gp_patch_group groups[2] = { { "COM1", &a, 1 },
					    { "COM2", &b, 1 } };
	struct gp_patch_rules rules = { margin, space, 30 * UM, tol, false };
	struct gp_polyset patches[2];
	gp_polyset_init(&patches[0]);
	gp_polyset_init(&patches[1]);
	assert_true(gp_patch_make(f->geos, groups, 2, NULL, 0, &rules,
				  patches, &f->diag));
	double d;
	assert_true(gp_geos_distance(f->geos, &patches[0], &patches[1], &d));
	/* at least the minimum space, and split in the middle: no more than
	 * the space plus the round cuts' allowance */
	assert_true(d >= (double)space);
	assert_true(d <= (double)(space + 2 * tol + 4));
	struct gp_polyset fa, fb;
	set_of(&fa, &a, 1);
	set_of(&fb, &b, 1);
	struct gp_registration ra, rb;
	assert_true(gp_patch_registration(f->geos, &fa, &patches[0], margin,
					  margin, &ra));
	assert_true(gp_patch_registration(f->geos, &fb, &patches[1], margin,
					  margin, &rb));
	for (int k = 0; k < GP_REGISTRATION_SHIFTS; k++) {
		/* COM1's patch gave up margin on its right: moving the back
		 * plate left (k % 3 == 0) loses; COM2 mirrors it */
		bool a_loses = k % 3 == 0, b_loses = k % 3 == 2;
		assert_true(a_loses ? ra.lit_mm2[k] < 1.0 - LIT_TOLERANCE
				    : fabs(ra.lit_mm2[k] - 1.0) < LIT_TOLERANCE);
		assert_true(b_loses ? rb.lit_mm2[k] < 1.0 - LIT_TOLERANCE
				    : fabs(rb.lit_mm2[k] - 1.0) < LIT_TOLERANCE);
	}
	/* the loss is the shortfall: (50 - 40) um less the allowances,
	 * over 1 mm of edge: about 0.011 mm^2 */
	assert_true(fabs((1.0 - ra.lit_mm2[3]) - 0.011) < 0.0015);
	assert_int_equal(f->diag.count, 0);
	gp_polyset_finish(&fa);
	gp_polyset_finish(&fb);
	gp_polyset_finish(&patches[0]);
	gp_polyset_finish(&patches[1]);
	gp_polygon_finish(&a);
	gp_polygon_finish(&b);
}

static void test_too_close_warns(void **state)
{
	struct fixture *f = *state;
	struct gp_polygon a, b;
	box_of(&a, 0, 0, MM, MM);
	box_of(&b, MM + 10 * UM, 0, 2 * MM, MM);
	struct gp_patch_group groups[2] = { { "COM1", &a, 1 },
					    { "COM2", &b, 1 } };
	struct gp_patch_rules rules = { 50 * UM, 20 * UM, 30 * UM, UM, false };
	struct gp_polyset patches[2];
	gp_polyset_init(&patches[0]);
	gp_polyset_init(&patches[1]);
	assert_true(gp_patch_make(f->geos, groups, 2, NULL, 0, &rules,
				  patches, &f->diag));
	assert_int_equal(f->diag.count, 1);
	const char *m = f->diag.entries[0].message;
	assert_non_null(strstr(m, "COM1"));
	assert_non_null(strstr(m, "COM2"));
	assert_non_null(strstr(m, "0.01 mm apart at (1.005, "));
	/* each front shape is still fully covered by its own patch */
	struct gp_polyset fa;
	set_of(&fa, &a, 1);
	struct gp_registration r;
	assert_true(gp_patch_registration(f->geos, &fa, &patches[0], 0, 0, &r));
	assert_true(fabs(r.lit_mm2[4] - 1.0) < LIT_TOLERANCE);
	gp_polyset_finish(&fa);
	gp_polyset_finish(&patches[0]);
	gp_polyset_finish(&patches[1]);
	gp_polygon_finish(&a);
	gp_polygon_finish(&b);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(test_margin_covers_shifts,
						setup, teardown),
		cmocka_unit_test_setup_teardown(test_small_margin_loses, setup,
						teardown),
		cmocka_unit_test_setup_teardown(test_notch, setup, teardown),
		cmocka_unit_test_setup_teardown(test_separation, setup,
						teardown),
		cmocka_unit_test_setup_teardown(test_too_close_warns, setup,
						teardown),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
