/* Design-rule and electrical checks.  A small clean dot-matrix artwork is
 * built by hand; each test plants one defect and expects exactly its
 * finding (rule, nets, place within 0.01 mm, value).  Electrical values
 * are checked against hand calculations with their sources. */
#include "check.h"
#include "units.h"

#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#define MM INT64_C(1000000)
#define UM INT64_C(1000)

/* 3 commons (back, rows) x 4 segments (front, columns); dots 0.5 mm
 * square at a 1 mm pitch; strips overrun the dots by 0.2 mm, more than
 * the 0.1 mm registration. */
enum { ROWS = 3, COLS = 4 };

struct fixture {
	struct gp_diag diag;
	struct gp_geos *geos;
	struct gp_artwork art;
	struct gp_check_limits limits;
	struct gp_check_report report;
	int com[ROWS], seg[COLS];
};

static int64_t row_y0(int r) { return (ROWS - 1 - r) * MM; }
static int64_t col_x0(int c) { return c * MM; }

static void build_matrix(struct fixture *f)
{
	gp_artwork_init(&f->art);
	for (int r = 0; r < ROWS; r++) {
		f->com[r] = gp_artwork_add_net(&f->art, GP_NET_COMMON,
					       GP_PLATE_BACK);
		assert_non_null(gp_artwork_add_box(
			&f->art, GP_LAYER_BACK_ITO, GP_ROLE_ELECTRODE,
			f->com[r],
			gp_box_make(-200 * UM, row_y0(r), 4200 * UM,
				    row_y0(r) + 500 * UM)));
	}
	for (int c = 0; c < COLS; c++) {
		f->seg[c] = gp_artwork_add_net(&f->art, GP_NET_SEGMENT,
					       GP_PLATE_FRONT);
		assert_non_null(gp_artwork_add_box(
			&f->art, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE,
			f->seg[c],
			gp_box_make(col_x0(c), -200 * UM, col_x0(c) + 500 * UM,
				    2700 * UM)));
	}
	for (int r = 0; r < ROWS; r++)
		for (int c = 0; c < COLS; c++)
			assert_non_null(gp_artwork_add_pixel(
				&f->art, f->com[r], f->seg[c],
				gp_box_make(col_x0(c), row_y0(r),
					    col_x0(c) + 500 * UM,
					    row_y0(r) + 500 * UM)));
}

static int setup(void **state)
{
	struct fixture *f = calloc(1, sizeof(*f));
	assert_non_null(f);
	gp_diag_init(&f->diag);
	f->geos = gp_geos_create(&f->diag);
	build_matrix(f);
	gp_check_limits_default(&f->limits);
	f->limits.plate[GP_PLATE_FRONT] =
		gp_box_make(-5 * MM, -5 * MM, 30 * MM, 10 * MM);
	f->limits.plate[GP_PLATE_BACK] =
		gp_box_make(-5 * MM, -5 * MM, 30 * MM, 10 * MM);
	f->limits.viewing = gp_box_make(-1 * MM, -1 * MM, 8 * MM, 3500 * UM);
	gp_check_report_init(&f->report);
	*state = f;
	return 0;
}

static int teardown(void **state)
{
	struct fixture *f = *state;
	gp_check_report_finish(&f->report);
	gp_artwork_finish(&f->art);
	gp_geos_destroy(f->geos);
	gp_diag_finish(&f->diag);
	free(f);
	return 0;
}

static void run(struct fixture *f)
{
	gp_check_report_finish(&f->report);
	gp_check_report_init(&f->report);
	assert_true(gp_check_run(f->geos, &f->art, &f->limits, &f->report,
				 &f->diag));
	assert_int_equal(f->diag.errors, 0);
}

static void add_box(struct fixture *f, enum gp_layer layer,
		    enum gp_role role, int net, int64_t x0, int64_t y0,
		    int64_t x1, int64_t y1)
{
	assert_non_null(gp_artwork_add_box(&f->art, layer, role, net,
					   gp_box_make(x0, y0, x1, y1)));
}

/* Exactly one finding, with this rule, nets, place and value. */
static const struct gp_finding *expect_one(struct fixture *f,
					   enum gp_check_rule rule, int net_a,
					   int net_b, double x_mm, double y_mm,
					   double value, double tolerance)
{
	for (size_t i = 0; i < f->report.count; i++)
		print_message("finding: %s %s\n",
			      gp_check_rule_name(f->report.findings[i].rule),
			      f->report.findings[i].text);
	assert_int_equal(f->report.count, 1);
	const struct gp_finding *x = &f->report.findings[0];
	assert_int_equal(x->rule, rule);
	assert_int_equal(x->nets[0], net_a);
	assert_int_equal(x->nets[1], net_b);
	assert_true(fabs(gp_mm(x->place.x) - x_mm) <= 0.01);
	assert_true(fabs(gp_mm(x->place.y) - y_mm) <= 0.01);
	assert_true(fabs(x->value - value) <= tolerance);
	return x;
}

static void test_clean_matrix(void **state)
{
	struct fixture *f = *state;
	run(f);
	assert_int_equal(f->report.count, 0);
	assert_int_equal(f->report.pixels_checked, ROWS * COLS);
	/* no seal yet: the notes say what stands in */
	assert_non_null(strstr((const char *)f->report.notes.data,
			       "viewing area stands in"));
	assert_non_null(strstr((const char *)f->report.notes.data,
			       "rc-time: no row time"));
}

static void test_planted_parasitic(void **state)
{
	struct fixture *f = *state;
	/* a stray bit of SEG1 beside its column, over COM2's strip */
	add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_LEAD, f->seg[0], 600 * UM,
		1100 * UM, 800 * UM, 1300 * UM);
	run(f);
	/* hand value: 0.2 mm x 0.2 mm = 0.04 mm^2 at (0.7, 1.2) */
	const struct gp_finding *x =
		expect_one(f, GP_CHECK_PARASITIC, f->com[1], f->seg[0], 0.7,
			   1.2, 0.04, 1e-9);
	assert_int_equal(x->severity, GP_SEVERITY_ERROR);
	assert_string_equal(gp_check_rule_name(x->rule), "parasitic-overlap");
}

static void test_planted_spacing(void **state)
{
	struct fixture *f = *state;
	/* a lead of SEG1 below the commons, ending 0.02 mm from SEG2 */
	add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_LEAD, f->seg[0], 500 * UM,
		-200 * UM, 980 * UM, -100 * UM);
	run(f);
	expect_one(f, GP_CHECK_SPACING, f->seg[0], f->seg[1], 0.99, -0.15,
		   0.02, 1e-9);
}

static void test_planted_thin_rect(void **state)
{
	struct fixture *f = *state;
	add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_LEAD, f->seg[0], 0,
		-1000 * UM, 500 * UM, -980 * UM);
	run(f);
	expect_one(f, GP_CHECK_LINE_WIDTH, f->seg[0], GP_NET_NONE, 0.25,
		   -0.99, 0.02, 1e-9);
}

/* A stroke inside a polygon, found by eroding and re-growing (GEOS). */
static void test_planted_thin_stroke(void **state)
{
	struct fixture *f = *state;
	/* a 0.3 mm square pad with a 0.02 mm x 0.5 mm arm to its right */
	static const int64_t xy[] = {
		0, -1300, 300, -1300, 300, -1160, 800, -1160,
		800, -1140, 300, -1140, 300, -1000, 0, -1000,
	};
	struct gp_polygon p;
	gp_polygon_init(&p);
	for (int i = 0; i < 8; i++)
		assert_true(gp_ring_push(&p.outer, xy[2 * i] * UM,
					 xy[2 * i + 1] * UM));
	assert_non_null(gp_artwork_add_shape(&f->art, GP_LAYER_FRONT_ITO,
					     GP_ROLE_LEAD, f->seg[0], &p));
	run(f);
	/* the arm: 0.02 mm wide, centred at (0.55, -1.15) */
	expect_one(f, GP_CHECK_LINE_WIDTH, f->seg[0], GP_NET_NONE, 0.55,
		   -1.15, 0.02, 0.0005);
}

static void add_icon(struct fixture *f, int64_t margin, int *com, int *seg)
{
	*com = gp_artwork_add_net(&f->art, GP_NET_COMMON, GP_PLATE_BACK);
	*seg = gp_artwork_add_net(&f->art, GP_NET_SEGMENT, GP_PLATE_FRONT);
	struct gp_box front = gp_box_make(6 * MM, 0, 7 * MM, MM);
	add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, *seg, front.x0,
		front.y0, front.x1, front.y1);
	add_box(f, GP_LAYER_BACK_ITO, GP_ROLE_PATCH, *com, front.x0 - margin,
		front.y0 - margin, front.x1 + margin, front.y1 + margin);
	struct gp_pixel *px = gp_artwork_add_pixel(&f->art, *com, *seg, front);
	assert_non_null(px);
	assert_true(gp_polygon_set_box(&px->shape, front));
	px->owner_kind = GP_OWNER_ICON;
}

static void test_icon_margin_enough(void **state)
{
	struct fixture *f = *state;
	int com, seg;
	add_icon(f, 100 * UM, &com, &seg);
	run(f);
	assert_int_equal(f->report.count, 0);
}

static void test_planted_registration(void **state)
{
	struct fixture *f = *state;
	int com, seg;
	add_icon(f, 50 * UM, &com, &seg);
	run(f);
	/* hand value: back moved by (-0.1, -0.1) leaves 0.95 x 0.95 of the
	 * 1 x 1 mm square lit: loss 1 - 0.9025 = 0.0975 */
	const struct gp_finding *x =
		expect_one(f, GP_CHECK_REGISTRATION, com, seg, 6.5, 0.5,
			   0.0975, 1e-9);
	assert_int_equal(x->pixel, ROWS * COLS);
	assert_int_not_equal(x->detail, 4);
}

/* A text icon lights in several parts: the pixel's shape holds the
 * first, 'more' the others; all of them are intended, none parasitic. */
static void test_icon_in_parts(void **state)
{
	struct fixture *f = *state;
	int com = gp_artwork_add_net(&f->art, GP_NET_COMMON, GP_PLATE_BACK);
	int seg = gp_artwork_add_net(&f->art, GP_NET_SEGMENT, GP_PLATE_FRONT);
	struct gp_box a = gp_box_make(5 * MM, 0, 6 * MM, MM);
	struct gp_box b = gp_box_make(6500 * UM, 0, 7500 * UM, MM);
	add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, seg, a.x0, a.y0,
		a.x1, a.y1);
	add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, seg, b.x0, b.y0,
		b.x1, b.y1);
	add_box(f, GP_LAYER_BACK_ITO, GP_ROLE_PATCH, com, a.x0 - 100 * UM,
		-100 * UM, b.x1 + 100 * UM, MM + 100 * UM);
	struct gp_pixel *px = gp_artwork_add_pixel(&f->art, com, seg,
						   gp_box_union(a, b));
	assert_non_null(px);
	assert_true(gp_polygon_set_box(&px->shape, a));
	struct gp_polygon second;
	gp_polygon_init(&second);
	assert_true(gp_polygon_set_box(&second, b));
	assert_true(gp_polyset_take(&px->more, &second));
	run(f);
	assert_int_equal(f->report.count, 0);
	assert_true(fabs(f->report.nets[seg].capacitance -
			 gp_check_capacitance(2.0, 6e-6, 7)) < 1e-24);
	/* without its second part the pixel would not explain the overlap */
	gp_polyset_finish(&f->art.pixels[f->art.pixel_count - 1].more);
	run(f);
	expect_one(f, GP_CHECK_PARASITIC, com, seg, 7.0, 0.5, 1.0, 1e-9);
}

/* The registration numbers two ways: GEOS intersection areas and the
 * exact rectangle arithmetic, for every dot and the icon. */
static void test_registration_two_ways(void **state)
{
	struct fixture *f = *state;
	int com, seg;
	add_icon(f, 50 * UM, &com, &seg);
	for (size_t p = 0; p < f->art.pixel_count; p++) {
		double a[9], b[9];
		assert_true(gp_check_pixel_lit_geos(f->geos, &f->art, p,
						    100 * UM, a));
		assert_true(gp_check_pixel_lit_exact(&f->art, p, 100 * UM, b));
		for (int k = 0; k < 9; k++)
			assert_true(fabs(a[k] - b[k]) < 1e-12);
		/* dots keep 0.25 mm^2 in every position (their strips
		 * overrun); the icon loses */
		if (p < ROWS * COLS)
			for (int k = 0; k < 9; k++)
				assert_true(fabs(a[k] - 0.25) < 1e-12);
		else
			assert_true(fabs(a[0] - 0.9025) < 1e-12);
	}
}

/* Hand calculations of the electrical checks. */
static void test_electrical_hand_values(void **state)
{
	(void)state;
	/* common practice: a straight 0.1 mm x 20 mm lead is 200 squares;
	 * at 30 ohm/square that is 6 kohm */
	double sq = gp_check_squares(20 * MM, 100 * UM, 100 * UM);
	assert_true(fabs(sq - 200) < 1e-12);
	assert_true(fabs(30 * sq - 6000) < 1e-9);
	/* a fan-out tapering 0.1 -> 0.3 mm over 20 mm: integral of dx/w =
	 * L ln(w1/w0)/(w1 - w0) = 20 ln 3 / 0.2 = 109.86 squares */
	assert_true(fabs(gp_check_squares(20 * MM, 100 * UM, 300 * UM) -
			 100 * log(3.0)) < 1e-9);
	/* parallel-plate formula C = eps0 eps_r A / d with eps0 from CODATA
	 * 2018 (8.8541878128e-12 F/m): a 0.5 x 0.5 mm pixel, 6 um gap,
	 * eps_r 7 is 2.582e-12 F, about 2.6 pF */
	assert_true(GP_EPSILON_0 == 8.8541878128e-12);
	double c = gp_check_capacitance(0.25, 6e-6, 7);
	assert_true(fabs(c - 8.8541878128e-12 * 7 * 0.25e-6 / 6e-6) < 1e-24);
	assert_true(fabs(c - 2.6e-12) < 0.05e-12);
}

static void test_lead_resistance_and_rc(void **state)
{
	struct fixture *f = *state;
	/* a 0.1 mm x 20 mm back lead of COM1 */
	add_box(f, GP_LAYER_BACK_ITO, GP_ROLE_LEAD, f->com[0], 4300 * UM,
		3000 * UM, 24300 * UM, 3100 * UM);
	run(f);
	assert_int_equal(f->report.count, 0);
	const struct gp_net_load *l = &f->report.nets[f->com[0]];
	assert_true(fabs(l->lead_squares - 200) < 1e-9);
	/* 6 kohm of lead plus half the 4.4 mm x 0.5 mm strip: 30 x 8.8 / 2 */
	assert_true(fabs(l->resistance - (6000 + 132)) < 1e-6);
	/* four 0.25 mm^2 dots at 6 um, eps_r 7 */
	double c4 = 4 * gp_check_capacitance(0.25, 6e-6, 7);
	assert_true(fabs(l->capacitance - c4) < 1e-24);
	assert_int_equal(l->pixels, COLS);
	/* segments carry three dots each */
	assert_int_equal(f->report.nets[f->seg[0]].pixels, ROWS);

	/* a row time under 3 tau is an error for COM1 only */
	f->limits.row_time = 100e-9;
	run(f);
	double tau = 6132 * c4;
	const struct gp_finding *x =
		expect_one(f, GP_CHECK_RC, f->com[0], GP_NET_NONE, 2.0, 2.25,
			   tau, 1e-15);
	assert_int_equal(x->severity, GP_SEVERITY_ERROR);
	assert_true(fabs(x->limit - 100e-9 / 3) < 1e-15);
}

static void test_resistance_spread(void **state)
{
	struct fixture *f = *state;
	/* COM1 with 200 squares of lead, COM2 with 50: ratio ~ 4 > 2 */
	add_box(f, GP_LAYER_BACK_ITO, GP_ROLE_LEAD, f->com[0], 4300 * UM,
		3000 * UM, 24300 * UM, 3100 * UM);
	add_box(f, GP_LAYER_BACK_ITO, GP_ROLE_LEAD, f->com[1], 4300 * UM,
		-1000 * UM, 9300 * UM, -900 * UM);
	run(f);
	double r1 = 6132, r2 = 30 * 50 + 132;
	const struct gp_finding *x = expect_one(
		f, GP_CHECK_SPREAD, f->com[0], f->com[1], 2.0, 2.25, r1 / r2,
		1e-9);
	assert_int_equal(x->severity, GP_SEVERITY_WARNING);
}

static void test_planted_edge(void **state)
{
	struct fixture *f = *state;
	/* 0.1 mm from the front plate's right edge at x = 30 mm */
	add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_LEAD, f->seg[3], 29700 * UM,
		-3000 * UM, 29900 * UM, -2000 * UM);
	run(f);
	expect_one(f, GP_CHECK_EDGE, f->seg[3], GP_NET_NONE, 29.9, -2.5, 0.1,
		   1e-9);
}

/* A pad keeps its ledge's own clearance from the edge along the ledge
 * (the description's ledge edge_clearance), the rules' from the others;
 * other ITO keeps the rules' everywhere. */
static void test_pad_clearance(void **state)
{
	struct fixture *f = *state;
	/* 0.3 mm above the front plate's bottom edge (y = -5 mm) */
	add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_PAD, f->seg[3], 20 * MM,
		-4700 * UM, 20300 * UM, -3200 * UM);
	run(f);
	expect_one(f, GP_CHECK_EDGE, f->seg[3], GP_NET_NONE, 20.15, -4.7, 0.3,
		   1e-9);
	assert_true(fabs(f->report.findings[0].limit - 0.5) < 1e-9);
	/* the ledge along the bottom asks for 0.3 mm: clean */
	f->limits.pad_clearance[GP_PLATE_FRONT][0] = 300 * UM;
	run(f);
	assert_int_equal(f->report.count, 0);
	/* not on the back plate's, nor on another side */
	f->limits.pad_clearance[GP_PLATE_FRONT][0] = -1;
	f->limits.pad_clearance[GP_PLATE_BACK][0] = 300 * UM;
	f->limits.pad_clearance[GP_PLATE_FRONT][3] = 300 * UM;
	run(f);
	expect_one(f, GP_CHECK_EDGE, f->seg[3], GP_NET_NONE, 20.15, -4.7, 0.3,
		   1e-9);
	/* a lead there keeps the rules' clearance whatever the ledge */
	f->limits.pad_clearance[GP_PLATE_FRONT][0] = 300 * UM;
	add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_LEAD, f->seg[2], 25 * MM,
		-4700 * UM, 25100 * UM, -4000 * UM);
	run(f);
	expect_one(f, GP_CHECK_EDGE, f->seg[2], GP_NET_NONE, 25.05, -4.7, 0.3,
		   1e-9);
}

static void test_pixels_outside_view(void **state)
{
	struct fixture *f = *state;
	/* the viewing area ends at x = 3.4 mm: SEG4's column (3..3.5)
	 * reaches 0.1 mm out, in each of the three rows */
	f->limits.viewing.x1 = 3400 * UM;
	run(f);
	assert_int_equal(f->report.count, ROWS);
	for (size_t i = 0; i < f->report.count; i++) {
		const struct gp_finding *x = &f->report.findings[i];
		assert_int_equal(x->rule, GP_CHECK_VIEW);
		assert_int_equal(x->severity, GP_SEVERITY_WARNING);
		assert_int_equal(x->nets[1], f->seg[3]);
		assert_true(fabs(x->value - 0.1) < 1e-9);
	}
}

static void test_connector_fit(void **state)
{
	struct fixture *f = *state;
	/* pads of 0.5 mm at a 1 mm pitch; strip conductors at 0.2 mm, two
	 * per pad and per gap: 0.4 mm needed */
	f->limits.conductor_pitch = 200 * UM;
	for (int c = 0; c < COLS; c++)
		add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_PAD, f->seg[c],
			col_x0(c), -4000 * UM,
			col_x0(c) + (c == 2 ? 300 : 500) * UM, -3000 * UM);
	run(f);
	expect_one(f, GP_CHECK_CONNECTOR, f->seg[2], GP_NET_NONE, 2.15, -3.5,
		   0.3, 1e-9);
}

static void add_seal(struct fixture *f)
{
	struct gp_polygon ring, hole;
	gp_polygon_init(&ring);
	gp_polygon_init(&hole);
	assert_true(gp_polygon_set_box(&ring, gp_box_make(-3 * MM, -3 * MM,
							   9 * MM, 6 * MM)));
	assert_true(gp_polygon_set_box(&hole, gp_box_make(-2 * MM, -2 * MM,
							   8 * MM, 5 * MM)));
	gp_ring_reverse(&hole.outer);
	assert_true(gp_polygon_add_hole(&ring, &hole.outer));
	gp_polygon_finish(&hole);
	assert_non_null(gp_artwork_add_shape(&f->art, GP_LAYER_SEAL,
					     GP_ROLE_SEAL, GP_NET_NONE, &ring));
}

static void test_seal(void **state)
{
	struct fixture *f = *state;
	add_seal(f);
	/* a parasitic overlap outside the seal does not count; inside does */
	add_box(f, GP_LAYER_BACK_ITO, GP_ROLE_LEAD, f->com[0], 0, 5500 * UM,
		500 * UM, 5800 * UM);
	add_box(f, GP_LAYER_FRONT_ITO, GP_ROLE_LEAD, f->seg[1], 100 * UM,
		5400 * UM, 200 * UM, 5900 * UM);
	run(f);
	assert_int_equal(f->report.count, 0);
	assert_non_null(strstr((const char *)f->report.notes.data,
			       "inside the seal"));
	/* a back patch under the seal line */
	add_box(f, GP_LAYER_BACK_ITO, GP_ROLE_PATCH, f->com[2], 8500 * UM,
		0, 8800 * UM, 1000 * UM);
	run(f);
	expect_one(f, GP_CHECK_SEAL, f->com[2], GP_NET_NONE, 8.65, 0.5, 0.3,
		   1e-9);
}

int main(void)
{
#define T(name) cmocka_unit_test_setup_teardown(name, setup, teardown)
	const struct CMUnitTest tests[] = {
		T(test_clean_matrix),
		T(test_planted_parasitic),
		T(test_planted_spacing),
		T(test_planted_thin_rect),
		T(test_planted_thin_stroke),
		T(test_icon_margin_enough),
		T(test_planted_registration),
		T(test_registration_two_ways),
		T(test_icon_in_parts),
		cmocka_unit_test(test_electrical_hand_values),
		T(test_lead_resistance_and_rc),
		T(test_resistance_spread),
		T(test_planted_edge),
		T(test_pad_clearance),
		T(test_pixels_outside_view),
		T(test_connector_fit),
		T(test_seal),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
