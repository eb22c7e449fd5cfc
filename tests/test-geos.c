/* Tests of the GEOS bridge: exact hand values where geometry gives them,
 * GEOS's own answers (GEOSArea through the bridge) against our shoelace
 * areas of the snapped results, and brute force against the STRtree. */
#include "geos.h"
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
#define PI 3.14159265358979323846

static void box_poly(struct gp_polygon *p, int64_t x0, int64_t y0, int64_t x1,
		     int64_t y1)
{
	gp_polygon_init(p);
	assert_true(gp_polygon_set_box(p, gp_box_make(x0, y0, x1, y1)));
}

static void box_set(struct gp_polyset *set, int64_t x0, int64_t y0,
		    int64_t x1, int64_t y1)
{
	struct gp_polygon p;
	box_poly(&p, x0, y0, x1, y1);
	assert_true(gp_polyset_take(set, &p));
}

static void ring_of(struct gp_ring *r, const int64_t *xy, size_t n)
{
	gp_ring_init(r);
	for (size_t i = 0; i < n; i++)
		assert_true(gp_ring_push(r, xy[2 * i], xy[2 * i + 1]));
}

/* Every result: outer rings counter-clockwise, holes clockwise, and the
 * area GEOS computes agrees with the shoelace area of the snapped rings. */
static double checked_area(struct fixture *f, const struct gp_polyset *set)
{
	for (size_t i = 0; i < set->count; i++) {
		assert_true(gp_ring_area2(&set->items[i].outer) > 0);
		for (size_t h = 0; h < set->items[i].hole_count; h++)
			assert_true(gp_ring_area2(&set->items[i].holes[h]) < 0);
	}
	double geos_area;
	assert_true(gp_geos_area_mm2(f->geos, set, &geos_area));
	assert_true(fabs(geos_area - gp_polyset_area_mm2(set)) < 1e-12);
	return geos_area;
}

static void test_square_area(void **state)
{
	struct fixture *f = *state;
	struct gp_polyset set;
	gp_polyset_init(&set);
	box_set(&set, 0, 0, MM, MM);
	/* hand value: a 1 mm x 1 mm square is 1 mm^2 exactly */
	assert_true(checked_area(f, &set) == 1.0);
	struct gp_geos_shape *s = gp_geos_shape_from_polyset(f->geos, &set);
	assert_non_null(s);
	assert_true(gp_geos_shape_area_mm2(f->geos, s) == 1.0);
	struct gp_box b = gp_geos_shape_bounds(s);
	assert_true(b.x0 == 0 && b.y0 == 0 && b.x1 == MM && b.y1 == MM);
	gp_geos_shape_destroy(f->geos, s);
	gp_polyset_finish(&set);
	assert_int_equal(f->diag.count, 0);
}

static void test_square_with_hole(void **state)
{
	struct fixture *f = *state;
	struct gp_polygon p;
	box_poly(&p, 0, 0, 10 * MM, 10 * MM);
	struct gp_polygon h;
	box_poly(&h, 3 * MM, 3 * MM, 7 * MM, 7 * MM);
	assert_true(gp_polygon_add_hole(&p, &h.outer));
	gp_polygon_finish(&h);
	gp_polygon_normalize(&p);
	struct gp_polyset set, out;
	gp_polyset_init(&set);
	gp_polyset_init(&out);
	assert_true(gp_polyset_take(&set, &p));
	/* hand value: 10 x 10 - 4 x 4 = 84 mm^2 */
	assert_true(checked_area(f, &set) == 84.0);
	/* through a union round trip the hole survives, oriented clockwise */
	assert_true(gp_geos_union_set(f->geos, &set, &out));
	assert_int_equal(out.count, 1);
	assert_int_equal(out.items[0].hole_count, 1);
	assert_true(checked_area(f, &out) == 84.0);
	gp_polyset_finish(&set);
	gp_polyset_finish(&out);
}

static void test_union_intersection_difference(void **state)
{
	struct fixture *f = *state;
	struct gp_polygon polys[3];
	box_poly(&polys[0], 0, 0, 2 * MM, 2 * MM);
	box_poly(&polys[1], MM, MM, 3 * MM, 3 * MM);
	box_poly(&polys[2], 10 * MM, 0, 11 * MM, MM);
	struct gp_polyset u;
	gp_polyset_init(&u);
	assert_true(gp_geos_union(f->geos, polys, 3, &u));
	/* hand value: 4 + 4 - 1 overlapping + 1 apart = 8 mm^2, 2 parts */
	assert_int_equal(u.count, 2);
	assert_true(checked_area(f, &u) == 8.0);

	struct gp_polyset a, b, i, d;
	gp_polyset_init(&a);
	gp_polyset_init(&b);
	gp_polyset_init(&i);
	gp_polyset_init(&d);
	box_set(&a, 0, 0, 2 * MM, 2 * MM);
	box_set(&b, MM, MM, 3 * MM, 3 * MM);
	assert_true(gp_geos_intersection(f->geos, &a, &b, &i));
	assert_int_equal(i.count, 1);
	assert_true(checked_area(f, &i) == 1.0);
	assert_true(gp_geos_difference(f->geos, &a, &b, &d));
	assert_true(checked_area(f, &d) == 3.0);
	/* the L-shaped difference has 6 corners at exact nm */
	assert_int_equal(d.items[0].outer.count, 6);

	for (int k = 0; k < 3; k++)
		gp_polygon_finish(&polys[k]);
	gp_polyset_finish(&u);
	gp_polyset_finish(&a);
	gp_polyset_finish(&b);
	gp_polyset_finish(&i);
	gp_polyset_finish(&d);
	assert_int_equal(f->diag.errors, 0);
}

static void test_quadrant_segments(void **state)
{
	(void)state;
	/* r = 0.5 mm, tolerance 1 um: step 2 acos(1 - 0.002) = 0.12651 rad,
	 * (pi/2) / 0.12651 = 12.42, so 13 segments per quarter */
	assert_int_equal(gp_geos_quadrant_segments(500 * UM, UM), 13);
	assert_int_equal(gp_geos_quadrant_segments(UM / 2, UM), 1);
	for (int64_t r = 10 * UM; r <= 10 * MM; r *= 3) {
		int n = gp_geos_quadrant_segments(r, UM);
		double sag = (double)r * (1 - cos(PI / 4 / n));
		assert_true(sag <= (double)UM);
	}
}

/* Standard formula (Steiner): a convex body dilated by a disc of radius r
 * has area A + P r + pi r^2; for a square of side a: a^2 + 4 a r + pi r^2.
 * GEOS puts the arc vertices on the circle, so the buffer lies inside
 * the true dilation by at most the chord tolerance along the arcs:
 * the area is low by less than (2 pi r) x tolerance. */
static void test_round_buffer_area(void **state)
{
	struct fixture *f = *state;
	const int64_t a = 2 * MM, r = 500 * UM, tol = UM;
	struct gp_polyset sq, out;
	gp_polyset_init(&sq);
	gp_polyset_init(&out);
	box_set(&sq, 0, 0, a, a);
	assert_true(gp_geos_offset(f->geos, &sq, r, GP_JOIN_ROUND, tol, &out));
	double am = gp_mm(a), rm = gp_mm(r);
	double exact = am * am + 4 * am * rm + PI * rm * rm;
	double area = checked_area(f, &out);
	assert_true(area <= exact + 1e-9);
	assert_true(exact - area < 2 * PI * rm * gp_mm(tol));
	/* and it really follows the arc: at least 4 x 13 arc vertices */
	assert_true(out.items[0].outer.count >= 4 * 13);

	/* a tighter tolerance comes closer */
	gp_polyset_finish(&out);
	gp_polyset_init(&out);
	assert_true(gp_geos_offset(f->geos, &sq, r, GP_JOIN_ROUND, 10, &out));
	area = checked_area(f, &out);
	assert_true(exact - area < 2 * PI * rm * 1e-5 + 1e-9);
	gp_polyset_finish(&sq);
	gp_polyset_finish(&out);
}

static void test_mitre_and_erode(void **state)
{
	struct fixture *f = *state;
	struct gp_polyset sq, out, back;
	gp_polyset_init(&sq);
	gp_polyset_init(&out);
	gp_polyset_init(&back);
	box_set(&sq, 0, 0, 2 * MM, 2 * MM);
	/* hand value: a mitred offset of a square by r is a square a + 2r */
	assert_true(gp_geos_offset(f->geos, &sq, 500 * UM, GP_JOIN_MITRE, UM,
				   &out));
	assert_true(checked_area(f, &out) == 9.0);
	assert_int_equal(out.items[0].outer.count, 4);
	/* eroding a 2 mm square by 0.5 mm leaves 1 mm x 1 mm */
	assert_true(gp_geos_offset(f->geos, &sq, -500 * UM, GP_JOIN_MITRE, UM,
				   &back));
	assert_true(checked_area(f, &back) == 1.0);
	gp_polyset_finish(&back);
	gp_polyset_init(&back);
	/* erode-and-regrow: a 0.1 mm line vanishes when eroded by 0.06 mm */
	gp_polyset_finish(&sq);
	gp_polyset_init(&sq);
	box_set(&sq, 0, 0, 10 * MM, 100 * UM);
	assert_true(gp_geos_offset(f->geos, &sq, -60 * UM, GP_JOIN_ROUND, UM,
				   &back));
	assert_int_equal(back.count, 0);
	gp_polyset_finish(&sq);
	gp_polyset_finish(&out);
	gp_polyset_finish(&back);
}

/* Minkowski sum of a convex polygon P with the box [-mx,mx]x[-my,my]:
 * area(P) + 2 mx H + 2 my W + 4 mx my, W and H the extents of P (sweep
 * P along x, then along y: Cavalieri's principle). */
static void test_dilate_box(void **state)
{
	struct fixture *f = *state;
	static const int64_t tri[] = { 0, 0, 3 * MM, 0, MM, 2 * MM };
	struct gp_polygon p;
	gp_polygon_init(&p);
	ring_of(&p.outer, tri, 3);
	struct gp_polyset set, out;
	gp_polyset_init(&set);
	gp_polyset_init(&out);
	assert_true(gp_polyset_take(&set, &p));
	const int64_t mx = 100 * UM, my = 50 * UM;
	assert_true(gp_geos_dilate_box(f->geos, &set, mx, my, &out));
	double expect = 3.0 + 2 * 0.1 * 2 + 2 * 0.05 * 3 + 4 * 0.1 * 0.05;
	assert_true(fabs(checked_area(f, &out) - expect) < 1e-9);
	/* every one of the 9 shifts of the triangle lies inside */
	struct gp_geos_shape *d = gp_geos_shape_from_polyset(f->geos, &out);
	struct gp_geos_shape *t = gp_geos_shape_from_polyset(f->geos, &set);
	for (int sx = -1; sx <= 1; sx++)
		for (int sy = -1; sy <= 1; sy++) {
			struct gp_geos_shape *m = gp_geos_shape_translate(
				f->geos, t, sx * mx, sy * my);
			assert_true(gp_geos_shape_covers(f->geos, d, m));
			gp_geos_shape_destroy(f->geos, m);
		}
	/* a little more is not covered */
	struct gp_geos_shape *m =
		gp_geos_shape_translate(f->geos, t, mx + 10, 0);
	assert_false(gp_geos_shape_covers(f->geos, d, m));
	gp_geos_shape_destroy(f->geos, m);
	gp_geos_shape_destroy(f->geos, d);
	gp_geos_shape_destroy(f->geos, t);
	gp_polyset_finish(&set);
	gp_polyset_finish(&out);
}

static void test_make_valid_rules(void **state)
{
	struct fixture *f = *state;
	static const int64_t outer[] = { 0, 0, 10 * MM, 0, 10 * MM, 10 * MM,
					 0, 10 * MM };
	static const int64_t inner_ccw[] = { 3 * MM, 3 * MM, 7 * MM, 3 * MM,
					     7 * MM, 7 * MM, 3 * MM, 7 * MM };
	static const int64_t inner_cw[] = { 3 * MM, 3 * MM, 3 * MM, 7 * MM,
					    7 * MM, 7 * MM, 7 * MM, 3 * MM };
	struct gp_ring rings[2];
	struct gp_polyset out;

	/* same direction: even-odd makes a hole, nonzero fills it */
	ring_of(&rings[0], outer, 4);
	ring_of(&rings[1], inner_ccw, 4);
	gp_polyset_init(&out);
	assert_true(gp_geos_make_valid(f->geos, rings, 2, GP_FILL_EVEN_ODD,
				       &out));
	assert_true(checked_area(f, &out) == 84.0);
	assert_int_equal(out.items[0].hole_count, 1);
	gp_polyset_finish(&out);
	assert_true(gp_geos_make_valid(f->geos, rings, 2, GP_FILL_NONZERO,
				       &out));
	assert_true(checked_area(f, &out) == 100.0);
	assert_int_equal(out.items[0].hole_count, 0);
	gp_polyset_finish(&out);
	gp_ring_finish(&rings[1]);

	/* opposite direction (TrueType style): a hole under both rules */
	ring_of(&rings[1], inner_cw, 4);
	assert_true(gp_geos_make_valid(f->geos, rings, 2, GP_FILL_NONZERO,
				       &out));
	assert_true(checked_area(f, &out) == 84.0);
	gp_polyset_finish(&out);
	gp_ring_finish(&rings[0]);
	gp_ring_finish(&rings[1]);

	/* a bow-tie crossing itself at (1, 1): two triangles of 1 mm^2 */
	static const int64_t bow[] = { 0, 0, 2 * MM, 2 * MM, 2 * MM, 0,
				       0, 2 * MM };
	ring_of(&rings[0], bow, 4);
	assert_true(gp_geos_make_valid(f->geos, rings, 1, GP_FILL_NONZERO,
				       &out));
	assert_int_equal(out.count, 2);
	assert_true(checked_area(f, &out) == 2.0);
	gp_polyset_finish(&out);
	gp_ring_finish(&rings[0]);

	/* two overlapping squares, same direction: 4 + 4 - 1 under nonzero,
	 * 4 + 4 - 2 x 1 under even-odd */
	static const int64_t s1[] = { 0, 0, 2 * MM, 0, 2 * MM, 2 * MM, 0,
				      2 * MM };
	static const int64_t s2[] = { MM, MM, 3 * MM, MM, 3 * MM, 3 * MM, MM,
				      3 * MM };
	ring_of(&rings[0], s1, 4);
	ring_of(&rings[1], s2, 4);
	assert_true(gp_geos_make_valid(f->geos, rings, 2, GP_FILL_NONZERO,
				       &out));
	assert_true(checked_area(f, &out) == 7.0);
	gp_polyset_finish(&out);
	assert_true(gp_geos_make_valid(f->geos, rings, 2, GP_FILL_EVEN_ODD,
				       &out));
	assert_true(checked_area(f, &out) == 6.0);
	gp_polyset_finish(&out);
	gp_ring_finish(&rings[0]);
	gp_ring_finish(&rings[1]);
	assert_int_equal(f->diag.errors, 0);
}

static void test_distance_and_predicates(void **state)
{
	struct fixture *f = *state;
	struct gp_polyset a, b;
	gp_polyset_init(&a);
	gp_polyset_init(&b);
	box_set(&a, 0, 0, MM, MM);
	box_set(&b, 2 * MM, 0, 3 * MM, MM);
	double d = -1;
	assert_true(gp_geos_distance(f->geos, &a, &b, &d));
	assert_true(d == (double)MM);
	/* diagonal: (3,4) mm apart corner to corner is 5 mm */
	gp_polyset_finish(&b);
	box_set(&b, 4 * MM, 5 * MM, 6 * MM, 6 * MM);
	assert_true(gp_geos_distance(f->geos, &a, &b, &d));
	assert_true(fabs(d - 5.0 * MM) < 1e-6);

	struct gp_geos_shape *sa = gp_geos_shape_from_box(
		f->geos, gp_box_make(0, 0, MM, MM));
	struct gp_geos_shape *touching = gp_geos_shape_from_box(
		f->geos, gp_box_make(MM, 0, 2 * MM, MM));
	struct gp_geos_shape *overlapping = gp_geos_shape_from_box(
		f->geos, gp_box_make(MM / 2, 0, 2 * MM, MM));
	struct gp_geos_shape *apart = gp_geos_shape_from_box(
		f->geos, gp_box_make(3 * MM, 0, 4 * MM, MM));
	assert_true(gp_geos_shape_intersects(f->geos, sa, touching));
	assert_true(gp_geos_shape_touches(f->geos, sa, touching));
	assert_false(gp_geos_shape_overlaps_area(f->geos, sa, touching));
	assert_true(gp_geos_shape_intersects(f->geos, sa, overlapping));
	assert_false(gp_geos_shape_touches(f->geos, sa, overlapping));
	assert_true(gp_geos_shape_overlaps_area(f->geos, sa, overlapping));
	assert_false(gp_geos_shape_intersects(f->geos, sa, apart));
	assert_false(gp_geos_shape_touches(f->geos, sa, apart));
	assert_true(gp_geos_shape_distance(f->geos, sa, apart, &d));
	assert_true(d == 2.0 * MM);
	/* intersection of touching squares has no area */
	struct gp_geos_shape *i =
		gp_geos_shape_intersection(f->geos, sa, touching);
	assert_true(gp_geos_shape_area_mm2(f->geos, i) == 0.0);
	struct gp_polyset none;
	gp_polyset_init(&none);
	assert_true(gp_geos_shape_to_polyset(f->geos, i, &none));
	assert_int_equal(none.count, 0);
	gp_geos_shape_destroy(f->geos, i);
	gp_geos_shape_destroy(f->geos, sa);
	gp_geos_shape_destroy(f->geos, touching);
	gp_geos_shape_destroy(f->geos, overlapping);
	gp_geos_shape_destroy(f->geos, apart);
	gp_polyset_finish(&a);
	gp_polyset_finish(&b);
	assert_int_equal(f->diag.errors, 0);
}

static uint64_t rng(uint64_t *s)
{
	/* xorshift64*, seeded per test so a failure replays */
	*s ^= *s >> 12;
	*s ^= *s << 25;
	*s ^= *s >> 27;
	return *s * UINT64_C(2685821657736338717);
}

static bool boxes_near(struct gp_box a, struct gp_box b, int64_t gap)
{
	return a.x0 - gap <= b.x1 && b.x0 <= a.x1 + gap &&
	       a.y0 - gap <= b.y1 && b.y0 <= a.y1 + gap;
}

/* The STRtree's pairs equal the brute-force pairs. */
static void test_box_pairs(void **state)
{
	struct fixture *f = *state;
	enum { N = 600 };
	struct gp_box boxes[N];
	uint64_t seed = 12345;
	for (int i = 0; i < N; i++) {
		int64_t x = (int64_t)(rng(&seed) % (50 * MM));
		int64_t y = (int64_t)(rng(&seed) % (50 * MM));
		int64_t w = (int64_t)(rng(&seed) % MM) + 1;
		int64_t h = (int64_t)(rng(&seed) % MM) + 1;
		boxes[i] = gp_box_make(x, y, x + w, y + h);
	}
	const int64_t gap = 200 * UM;
	struct gp_index_pair *pairs = NULL;
	size_t count = 0;
	assert_true(gp_geos_box_pairs(f->geos, boxes, N, gap, &pairs, &count));
	size_t k = 0;
	for (size_t i = 0; i < N; i++)
		for (size_t j = i + 1; j < N; j++)
			if (boxes_near(boxes[i], boxes[j], gap)) {
				assert_true(k < count);
				assert_true(pairs[k].a == i && pairs[k].b == j);
				k++;
			}
	assert_int_equal(k, count);
	assert_true(count > 10);
	free(pairs);
}

static void count_item(void *user, size_t item)
{
	size_t *seen = user;
	seen[item]++;
}

static void test_index_query(void **state)
{
	struct fixture *f = *state;
	struct gp_geos_index *index = gp_geos_index_create(f->geos);
	assert_non_null(index);
	for (size_t i = 0; i < 10; i++)
		assert_true(gp_geos_index_add(
			index,
			gp_box_make((int64_t)i * MM, 0, (int64_t)i * MM + MM / 2,
				    MM),
			i));
	size_t seen[10] = { 0 };
	/* touching the edge of box 3 counts; boxes 3..5 */
	assert_true(gp_geos_index_query(index,
					gp_box_make(3 * MM + MM / 2, 0,
						    5 * MM + 1, MM),
					count_item, seen));
	for (size_t i = 0; i < 10; i++)
		assert_int_equal(seen[i], i >= 3 && i <= 5 ? 1 : 0);
	/* after the first query the tree is built: adding is an error */
	assert_false(gp_geos_index_add(index, gp_box_make(0, 0, 1, 1), 10));
	assert_true(f->diag.errors > 0);
	gp_geos_index_destroy(index);
	gp_geos_index_destroy(NULL);
}

/* GEOS errors land in our diagnostics, not on stderr: GEOS's overlay
 * refuses a self-crossing polygon (TopologyException). */
static void test_errors_routed(void **state)
{
	struct fixture *f = *state;
	static const int64_t bow[] = { 0, 0, 2 * MM, 2 * MM, 2 * MM, 0,
				       0, 2 * MM };
	struct gp_polygon p;
	gp_polygon_init(&p);
	ring_of(&p.outer, bow, 4);
	struct gp_geos_shape *a = gp_geos_shape_from_polygon(f->geos, &p);
	struct gp_geos_shape *b = gp_geos_shape_from_box(
		f->geos, gp_box_make(MM / 2, 0, 3 * MM, MM));
	assert_int_equal(f->diag.errors, 0);
	assert_null(gp_geos_shape_intersection(f->geos, a, b));
	assert_true(f->diag.errors > 0);
	assert_non_null(strstr(f->diag.entries[0].message,
			       "GEOS: TopologyException"));
	gp_geos_shape_destroy(f->geos, a);
	gp_geos_shape_destroy(f->geos, b);
	gp_polygon_finish(&p);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(test_square_area, setup,
						teardown),
		cmocka_unit_test_setup_teardown(test_square_with_hole, setup,
						teardown),
		cmocka_unit_test_setup_teardown(
			test_union_intersection_difference, setup, teardown),
		cmocka_unit_test(test_quadrant_segments),
		cmocka_unit_test_setup_teardown(test_round_buffer_area, setup,
						teardown),
		cmocka_unit_test_setup_teardown(test_mitre_and_erode, setup,
						teardown),
		cmocka_unit_test_setup_teardown(test_dilate_box, setup,
						teardown),
		cmocka_unit_test_setup_teardown(test_make_valid_rules, setup,
						teardown),
		cmocka_unit_test_setup_teardown(test_distance_and_predicates,
						setup, teardown),
		cmocka_unit_test_setup_teardown(test_box_pairs, setup,
						teardown),
		cmocka_unit_test_setup_teardown(test_index_query, setup,
						teardown),
		cmocka_unit_test_setup_teardown(test_errors_routed, setup,
						teardown),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
