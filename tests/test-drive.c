/* Drive arithmetic against published and tabulated values.
 *
 * Sources named beside each value:
 * - "LCD driver tables, from memory": the standard multiplex formulas as
 *   tabulated in LCD driver documentation, values recalled from memory.
 * - "Alt & Pleshko 1974": P. M. Alt and P. Pleshko, "Scanning limitations of
 *   liquid-crystal displays", IEEE Transactions on Electron Devices ED-21
 *   (1974): maximum selection ratio sqrt((sqrt N + 1)/(sqrt N - 1)) at bias
 *   1/(sqrt N + 1).
 * - "common practice, no published source": trade rules of thumb. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include "drive.h"
#include "build.h"
#include "model.h"

#include <json-c/json.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* values are quoted to 3 decimals, so half a unit in the last place */
#define TOL3 0.0005

static void assert_near(double actual, double expected, double tolerance)
{
	if (fabs(actual - expected) > tolerance)
		fail_msg("%.6f is not %.6f within %g", actual, expected,
			 tolerance);
}

struct duty_case {
	long commons;
	double bias;
	double von, voff, ratio;
};

static void test_fractions_table(void **state)
{
	(void)state;
	/* LCD driver tables, from memory: Von/Vop, Voff/Vop, Von/Voff */
	static const struct duty_case cases[] = {
		{ 2, 2.0, 0.791, 0.354, 2.236 }, /* 1/2 duty 1/2 bias */
		{ 2, 3.0, 0.745, 0.333, 2.236 }, /* 1/2 duty 1/3 bias */
		{ 3, 3.0, 0.638, 0.333, 1.915 }, /* 1/3 duty 1/3 bias */
		{ 4, 3.0, 0.577, 0.333, 1.732 }, /* 1/4 duty 1/3 bias */
	};
	for (size_t i = 0; i < sizeof(cases) / sizeof(cases[0]); i++) {
		double von, voff;
		gp_drive_fractions(cases[i].commons, cases[i].bias, &von,
				   &voff);
		assert_near(von, cases[i].von, TOL3);
		assert_near(voff, cases[i].voff, TOL3);
		assert_near(gp_drive_ratio(cases[i].commons, cases[i].bias),
			    cases[i].ratio, TOL3);
	}
}

static void test_static(void **state)
{
	(void)state;
	double von, voff;
	/* LCD driver tables, from memory: static drive Von = Vop, Voff = 0 */
	gp_drive_fractions(1, 3.0, &von, &voff);
	assert_near(von, 1.0, TOL3);
	assert_near(voff, 0.0, TOL3);
	assert_true(isinf(gp_drive_ratio(1, 2.0)));
	assert_true(isinf(gp_drive_ratio_max(1)));

	struct gp_drive_params p = { .commons = 1, .vth = 1.5, .vsat = 2.0 };
	struct gp_drive_result r;
	assert_true(gp_drive_compute(&p, &r));
	assert_true(r.is_static);
	assert_true(r.feasible);
	assert_true(isinf(r.window.high));
	/* Von = Vop, so the window starts at Vsat */
	assert_near(r.window.low, 2.0, 1e-9);
	assert_int_equal(r.levels.count, 2);
	assert_near(r.levels.volts[0], r.vop, 1e-12);
	assert_near(r.levels.volts[1], 0.0, 1e-12);
}

static void test_alt_pleshko(void **state)
{
	(void)state;
	/* Alt & Pleshko 1974: sqrt((sqrt N + 1)/(sqrt N - 1)) */
	assert_near(gp_drive_ratio_max(4), 1.732, TOL3);
	assert_near(gp_drive_ratio_max(64), 1.134, TOL3);
	/* Alt & Pleshko 1974: best bias 1/(sqrt N + 1), 1/9 at N = 64 */
	assert_near(1.0 / gp_drive_best_bias(64), 1.0 / 9.0, 1e-12);
	assert_near(gp_drive_best_bias(64), 9.0, 1e-12);
	/* the general formula at the best bias reaches the maximum */
	assert_near(gp_drive_ratio(64, 9.0), 1.134, TOL3);
	assert_near(gp_drive_ratio(4, 3.0), gp_drive_ratio_max(4), 1e-12);
	/* and no other bias beats it (Alt & Pleshko 1974: it is the
	 * maximum) */
	for (double a = 2.0; a <= 65.0; a += 0.25)
		assert_true(gp_drive_ratio(64, a) <=
			    gp_drive_ratio_max(64) + 1e-12);
	/* whole-number best bias: 1/9 at 64, 1/3 at 4 (Alt & Pleshko 1974,
	 * square N) */
	assert_int_equal(gp_drive_best_whole_bias(64), 9);
	assert_int_equal(gp_drive_best_whole_bias(4), 3);
}

static void test_infeasible_64(void **state)
{
	(void)state;
	/* 1/64 duty with Vsat/Vth = 1.3: Alt & Pleshko 1974 allows at most
	 * 1.134, so no Vop switches the fluid */
	struct gp_drive_params p = {
		.commons = 64, .bias = 0.0, .vth = 2.0, .vsat = 2.6,
	};
	struct gp_drive_result r;
	assert_true(gp_drive_compute(&p, &r));
	assert_false(r.feasible);
	assert_true(r.window.empty);
	assert_false(r.bias_fix);
	/* Alt & Pleshko 1974 solved for N: sqrt N <= (r^2+1)/(r^2-1) =
	 * 2.69/0.69 = 3.899, N <= 15.2, so 1/15 duty is the largest */
	assert_int_equal(r.max_commons, 15);
	assert_true(gp_drive_ratio_max(15) >= 1.3);
	assert_true(gp_drive_ratio_max(16) < 1.3);
}

static void test_feasible_window(void **state)
{
	(void)state;
	/* 1/4 duty 1/3 bias, ratio 1.732 (LCD driver tables, from memory),
	 * fluid steepness 1.3 */
	struct gp_drive_params p = {
		.commons = 4, .bias = 3.0, .vth = 2.0, .vsat = 2.6,
	};
	struct gp_drive_result r;
	assert_true(gp_drive_compute(&p, &r));
	assert_true(r.feasible);
	assert_true(r.window.low < r.window.recommended);
	assert_true(r.window.recommended < r.window.high);
	/* the edges are the definitions: Von(low) = Vsat, Voff(high) = Vth */
	assert_near(r.window.low * r.von, 2.6, 1e-9);
	assert_near(r.window.high * r.voff, 2.0, 1e-9);
	/* Voff/Vop = 1/3 (from memory, above): high = 3 Vth = 6 V */
	assert_near(r.window.high, 6.000, TOL3);
	/* Von/Vop = 0.577: low = 2.6 / 0.57735 = 4.503 V */
	assert_near(r.window.low, 4.503, TOL3);
	assert_true(r.vop_in_window);
}

static void test_bias_fix(void **state)
{
	(void)state;
	/* 1/16 duty, Vsat/Vth = 1.25: 1/3 bias gives
	 * sqrt((9+15)/(1+15)) = 1.225 (the formula above), too little; the
	 * best 1/5 bias reaches sqrt(5/3) = 1.291 (Alt & Pleshko 1974) */
	struct gp_drive_params p = {
		.commons = 16, .bias = 3.0, .vth = 2.0, .vsat = 2.5,
	};
	struct gp_drive_result r;
	assert_true(gp_drive_compute(&p, &r));
	assert_near(r.ratio, 1.225, TOL3);
	assert_near(r.ratio_max, 1.291, TOL3);
	assert_false(r.feasible);
	assert_true(r.bias_fix);
	assert_true(r.bias_low <= 5.0 && 5.0 <= r.bias_high);
	assert_true(r.bias_low > 3.0);
	assert_true(gp_drive_ratio(16, r.bias_low) >= 1.25 - 1e-9);
	assert_true(gp_drive_ratio(16, r.bias_high) >= 1.25 - 1e-9);
	/* with 1/3 bias kept, the ratio 1.25 holds up to
	 * M <= (9 - 1.5625)/0.5625 = 13.2, N = 14 */
	assert_int_equal(r.max_commons_at_bias, 14);
	assert_true(gp_drive_ratio(14, 3.0) >= 1.25);
	assert_true(gp_drive_ratio(15, 3.0) < 1.25);
}

/* The usual driver order V0..V5: V0 = Vop, V1 = (a-1)/a, V2 = (a-2)/a,
 * V3 = 2/a, V4 = 1/a, V5 = 0 times Vop (LCD driver tables, from memory). */
static void assert_levels(const struct gp_drive_levels *l, double a,
			  double vop)
{
	const double expected[6] = { 1.0, (a - 1) / a, (a - 2) / a,
				     2 / a, 1 / a, 0.0 };
	assert_int_equal(l->count, 6);
	for (size_t i = 0; i < 6; i++) {
		assert_near(l->fraction[i], expected[i], 1e-12);
		assert_near(l->volts[i], vop * expected[i], 1e-12);
	}
}

static void test_levels(void **state)
{
	(void)state;
	struct gp_drive_levels l;
	/* 1/3 bias at 6 V: V1 = V3 = 4 V, V2 = V4 = 2 V, four taps in equal
	 * steps (LCD driver tables, from memory) */
	gp_drive_levels(4, 3.0, 6.0, &l);
	assert_levels(&l, 3.0, 6.0);
	assert_near(l.volts[1], 4.0, 1e-12);
	assert_near(l.volts[2], 2.0, 1e-12);
	assert_int_equal(l.same_as[0], -1);
	assert_int_equal(l.same_as[1], -1);
	assert_int_equal(l.same_as[2], -1);
	assert_int_equal(l.same_as[3], 1);
	assert_int_equal(l.same_as[4], 2);
	assert_int_equal(l.same_as[5], -1);
	assert_int_equal(l.taps, 4);
	for (size_t i = 0; i < 3; i++)
		assert_near(l.resistor[i], 1.0, 1e-12);
	/* 1/2 bias at 5 V: V1 = V4 = 2.5 V, V2 = V5 = 0, V3 = V0 = Vop,
	 * three taps */
	gp_drive_levels(2, 2.0, 5.0, &l);
	assert_levels(&l, 2.0, 5.0);
	assert_int_equal(l.same_as[1], -1);
	assert_int_equal(l.same_as[2], -1);
	assert_int_equal(l.same_as[3], 0);
	assert_int_equal(l.same_as[4], 1);
	assert_int_equal(l.same_as[5], 2);
	assert_int_equal(l.taps, 3);
	assert_near(l.volts[1], 2.5, 1e-12);
	/* 1/4 bias: V2 = V3 = Vop/2, five taps */
	gp_drive_levels(8, 4.0, 8.0, &l);
	assert_levels(&l, 4.0, 8.0);
	assert_int_equal(l.same_as[3], 2);
	assert_int_equal(l.same_as[4], -1);
	assert_int_equal(l.taps, 5);
	/* 1/9 bias (N = 64): six levels, V2 = 14 V above V3 = 4 V at
	 * 18 V, ladder R:R:5R:R:R (from memory: the middle resistor is
	 * (a-4)R) */
	gp_drive_levels(64, 9.0, 18.0, &l);
	assert_levels(&l, 9.0, 18.0);
	assert_near(l.volts[1], 16.0, 1e-12);
	assert_near(l.volts[2], 14.0, 1e-12);
	assert_near(l.volts[3], 4.0, 1e-12);
	assert_near(l.volts[4], 2.0, 1e-12);
	assert_int_equal(l.taps, 6);
	assert_near(l.resistor[2], 5.0, 1e-12);
	/* 1/5 bias: six distinct levels in equal steps */
	gp_drive_levels(16, 5.0, 10.0, &l);
	assert_levels(&l, 5.0, 10.0);
	for (size_t i = 0; i < 6; i++)
		assert_int_equal(l.same_as[i], -1);
	for (size_t i = 0; i < 5; i++)
		assert_near(l.resistor[i], 1.0, 1e-12);
}

struct bias_case {
	long commons;
	long low, high;     /* the whole-number biases listed */
	long chosen;
	double ratio_max;   /* Alt & Pleshko 1974 */
	struct { long a; double von, voff, ratio; } rows[3];
};

/* The whole-number biases against the published formulas: Von/Vop =
 * sqrt((a^2 + N - 1)/(N a^2)), Voff/Vop = sqrt(((a-2)^2 + N - 1)/(N a^2))
 * and the maximum sqrt((sqrt N + 1)/(sqrt N - 1)) at a = sqrt N + 1 (Alt &
 * Pleshko 1974), evaluated to 3 decimals by hand. */
static void test_bias_table(void **state)
{
	(void)state;
	static const struct bias_case cases[] = {
		/* 1/2 duty: 1/2 and 1/3 both sqrt 5 = 2.236; the tie goes to
		 * the smaller ladder */
		{ 2, 2, 3, 2, 2.414,
		  { { 2, 0.791, 0.354, 2.236 }, { 3, 0.745, 0.333, 2.236 } } },
		{ 3, 2, 4, 3, 1.932,
		  { { 2, 0.707, 0.408, 1.732 }, { 3, 0.638, 0.333, 1.915 },
		    { 4, 0.612, 0.354, 1.732 } } },
		{ 4, 2, 4, 3, 1.732,
		  { { 2, 0.661, 0.433, 1.528 }, { 3, 0.577, 0.333, 1.732 },
		    { 4, 0.545, 0.331, 1.648 } } },
		/* 1/8 duty: the optimum 1/3.828 lies between, 1/4 wins */
		{ 8, 2, 5, 4, 1.447,
		  { { 3, 0.471, 0.333, 1.414 }, { 4, 0.424, 0.293, 1.446 },
		    { 5, 0.400, 0.283, 1.414 } } },
		{ 16, 2, 6, 5, 1.291,
		  { { 4, 0.348, 0.272, 1.277 }, { 5, 0.316, 0.245, 1.291 },
		    { 6, 0.298, 0.232, 1.283 } } },
		/* 1/64 duty: eight rows ending one past the optimum 1/9 */
		{ 64, 3, 10, 9, 1.134,
		  { { 8, 0.176, 0.155, 1.133 }, { 9, 0.167, 0.147, 1.134 },
		    { 10, 0.160, 0.141, 1.133 } } },
	};
	for (size_t i = 0; i < sizeof(cases) / sizeof(cases[0]); i++) {
		const struct bias_case *c = &cases[i];
		struct gp_drive_params p = { .commons = c->commons };
		struct gp_drive_result r;
		assert_true(gp_drive_compute(&p, &r));
		assert_true(r.bias_by_rule);
		assert_near(r.bias, (double)c->chosen, 0.0);
		assert_near(r.ratio_max, c->ratio_max, TOL3);
		assert_int_equal(r.bias_rows, (size_t)(c->high - c->low + 1));
		assert_int_equal(r.biases[0].a, c->low);
		assert_int_equal(r.biases[r.bias_rows - 1].a, c->high);
		assert_int_equal(r.biases[r.chosen_row].a, c->chosen);
		for (size_t k = 0; k < 3 && c->rows[k].a; k++) {
			const struct gp_drive_bias_row *row =
				&r.biases[c->rows[k].a - c->low];
			assert_int_equal(row->a, c->rows[k].a);
			assert_near(row->von, c->rows[k].von, TOL3);
			assert_near(row->voff, c->rows[k].voff, TOL3);
			assert_near(row->ratio, c->rows[k].ratio, TOL3);
			assert_near(row->share, c->rows[k].ratio / c->ratio_max,
				    0.001);
		}
		/* no listed whole-number bias beats the chosen one, and
		 * none beats the Alt & Pleshko 1974 maximum */
		for (size_t k = 0; k < r.bias_rows; k++) {
			assert_true(r.biases[k].ratio <=
				    r.biases[r.chosen_row].ratio + 1e-12);
			assert_true(r.biases[k].ratio <= r.ratio_max + 1e-12);
		}
	}
	/* a given bias outside the span is listed in its place: 1/2 at
	 * 1/64 duty, ratio 1.0 + ... (the formula: sqrt(67/63) = 1.031) */
	struct gp_drive_params p = { .commons = 64, .bias = 2.0 };
	struct gp_drive_result r;
	assert_true(gp_drive_compute(&p, &r));
	assert_false(r.bias_by_rule);
	assert_int_equal(r.bias_rows, 9);
	assert_int_equal(r.chosen_row, 0);
	assert_int_equal(r.biases[0].a, 2);
	assert_near(r.biases[0].ratio, 1.031, TOL3);
	/* the window of each row: Von = Vsat at its low edge, Voff = Vth at
	 * its high one (the window's definition); 1/16 duty, Vth 2.05 V,
	 * Vsat 2.45 V: 1/2 bias (1.125) cannot switch 1.195, 1/5 can */
	struct gp_drive_params q = { .commons = 16, .vth = 2.05,
				     .vsat = 2.45 };
	assert_true(gp_drive_compute(&q, &r));
	assert_int_equal(r.biases[0].a, 2);
	assert_true(r.biases[0].window.empty);
	const struct gp_drive_bias_row *five = &r.biases[3];
	assert_int_equal(five->a, 5);
	assert_false(five->window.empty);
	assert_near(five->window.low * five->von, 2.45, 1e-9);
	assert_near(five->window.high * five->voff, 2.05, 1e-9);
	/* 2.05 / 0.2449 = 8.369 V, 2.45 / 0.3162 = 7.748 V */
	assert_near(five->window.high, 8.369, TOL3);
	assert_near(five->window.low, 7.748, TOL3);
	/* static drive has no bias to list */
	struct gp_drive_params one = { .commons = 1 };
	assert_true(gp_drive_compute(&one, &r));
	assert_int_equal(r.bias_rows, 0);
}

static void test_temperature(void **state)
{
	(void)state;
	/* -0.4 %/degC of Vth from 25 degC over -20..70 degC: factors
	 * 1 + 0.004*45 = 1.18 and 1 - 0.004*45 = 0.82 (arithmetic) */
	struct gp_drive_params p = {
		.commons = 4, .bias = 3.0, .vth = 2.0, .vsat = 2.5,
		.tc_unit = GP_DRIVE_TC_PERCENT, .tc = -0.4, .t_ref = 25.0,
		.has_range = true, .t_min = -20.0, .t_max = 70.0,
	};
	struct gp_drive_result r;
	assert_true(gp_drive_compute(&p, &r));
	assert_true(r.has_temperature);
	assert_near(r.cold.factor, 1.18, 1e-12);
	assert_near(r.hot.factor, 0.82, 1e-12);
	assert_near(r.cold.window.recommended, 1.18 * r.window.recommended,
		    1e-9);
	/* one Vop for the whole range: above the cold low edge and below
	 * the hot high edge; 1.18 * 2.5/0.57735 = 5.109 > 0.82 * 6 = 4.92,
	 * so none exists */
	assert_near(r.common_low, r.cold.window.low, 1e-9);
	assert_near(r.common_high, r.hot.window.high, 1e-9);
	assert_true(r.common_empty);

	/* the same coefficient in mV/degC: -0.4 % of 2 V = -8 mV/degC */
	p.tc_unit = GP_DRIVE_TC_MILLIVOLT;
	p.tc = -8.0;
	struct gp_drive_result m;
	assert_true(gp_drive_compute(&p, &m));
	assert_near(m.cold.factor, 1.18, 1e-12);
	assert_near(m.hot.factor, 0.82, 1e-12);

	/* a narrow range fits one fixed Vop */
	p.t_min = 20.0;
	p.t_max = 30.0;
	assert_true(gp_drive_compute(&p, &m));
	assert_false(m.common_empty);
	assert_true(m.vop_in_window_cold && m.vop_in_window_hot);
}

static void test_timing(void **state)
{
	(void)state;
	/* 1/8 duty at 80 Hz: row 1/(8*80) s = 1.5625 ms (arithmetic) */
	struct gp_drive_params p = {
		.commons = 8, .vth = 1.0, .vsat = 1.2, .frame_rate = 80.0,
	};
	struct gp_drive_result r;
	assert_true(gp_drive_compute(&p, &r));
	assert_true(r.has_timing);
	assert_near(r.row_time, 1.5625e-3, 1e-12);
	assert_near(r.half_row_time, 0.78125e-3, 1e-12);
	assert_near(r.cycle_line, 12.5e-3, 1e-12);
	assert_near(r.cycle_frame, 25e-3, 1e-12);
	assert_false(r.flicker);
	assert_false(r.power);
	/* below 60 Hz flickers, above 150 Hz wastes power: common practice,
	 * no published source */
	p.frame_rate = 50.0;
	assert_true(gp_drive_compute(&p, &r));
	assert_true(r.flicker);
	p.frame_rate = 200.0;
	assert_true(gp_drive_compute(&p, &r));
	assert_true(r.power);
}

static void test_params_problems(void **state)
{
	(void)state;
	struct gp_drive_params p = { .commons = 8, .vth = 1.0, .vsat = 1.2 };
	assert_null(gp_drive_params_problem(&p));
	p.commons = 0;
	assert_non_null(gp_drive_params_problem(&p));
	p.commons = 8;
	p.bias = 1.5; /* 1/1.5 is above 1/2 */
	assert_non_null(gp_drive_params_problem(&p));
	p.bias = 10.0; /* 1/10 is below 1/(N+1) = 1/9 */
	assert_non_null(gp_drive_params_problem(&p));
	p.bias = 9.0;
	assert_null(gp_drive_params_problem(&p));
	p.vsat = 1.0; /* Vsat must exceed Vth */
	assert_non_null(gp_drive_params_problem(&p));
	p.vsat = 1.2;
	p.has_range = true;
	p.t_min = 50.0;
	p.t_max = -10.0;
	assert_non_null(gp_drive_params_problem(&p));
	struct gp_drive_result r;
	assert_false(gp_drive_compute(&p, &r));
}

static void test_single_threshold(void **state)
{
	(void)state;
	/* single threshold: Vop puts Voff on Vth; 1/4 duty 1/3 bias,
	 * Voff/Vop = 1/3 (LCD driver tables, from memory), so Vop = 3 Vth */
	struct gp_drive_params p = { .commons = 4, .bias = 3.0, .vth = 1.5 };
	struct gp_drive_result r;
	assert_true(gp_drive_compute(&p, &r));
	assert_true(r.feasible);
	assert_near(r.window.recommended, 4.5, 1e-9);
	assert_near(r.vop * r.von, 1.5 * 1.732, 0.002);
}


/* The window is empty exactly when the selection ratio is below Vsat/Vth
 * (its definition: Voff <= Vth and Von >= Vsat), and every suggestion made
 * for an empty one really works.  Fixed seed, so a failure replays. */
static void test_window_property(void **state)
{
	(void)state;
	unsigned seed = 12345;
	for (int i = 0; i < 20000; i++) {
		seed = seed * 1103515245u + 12345u;
		long n = 2 + (long)(seed >> 8) % 400;
		seed = seed * 1103515245u + 12345u;
		double a = 2.0 + (double)((seed >> 8) % 1000) / 999.0 *
					 ((double)n - 1.0);
		seed = seed * 1103515245u + 12345u;
		double steep = 1.0 + (double)((seed >> 8) % 1000 + 1) / 1000.0;
		struct gp_drive_params p = {
			.commons = n, .bias = a, .vth = 1.7, .vsat = 1.7 * steep,
		};
		struct gp_drive_result r;
		assert_true(gp_drive_compute(&p, &r));
		bool switches = r.ratio >= steep;
		if (fabs(r.ratio - steep) > 1e-9)
			assert_int_equal(r.feasible, switches);
		if (r.feasible) {
			assert_true(r.window.low <= r.window.recommended);
			assert_true(r.window.recommended <= r.window.high);
			assert_true(r.window.recommended * r.voff <=
				    1.7 * (1 + 1e-12));
			assert_true(r.window.recommended * r.von >=
				    1.7 * steep * (1 - 1e-12));
			continue;
		}
		if (r.bias_fix) {
			assert_true(gp_drive_ratio(n, r.bias_low) >=
				    steep - 1e-9);
			assert_true(gp_drive_ratio(n, r.bias_high) >=
				    steep - 1e-9);
			/* and it is the whole range */
			if (r.bias_low > 2.001)
				assert_true(gp_drive_ratio(n, r.bias_low -
								      1e-3) <
					    steep);
			if (r.bias_high < (double)n + 0.999)
				assert_true(gp_drive_ratio(n, r.bias_high +
								      1e-3) <
					    steep);
		} else {
			assert_true(r.ratio_max < steep);
		}
		if (r.max_commons >= 2) {
			assert_true(gp_drive_ratio_max(r.max_commons) >= steep);
			assert_true(gp_drive_ratio_max(r.max_commons + 1) <
				    steep);
		}
		if (r.max_commons_whole >= 2)
			assert_true(gp_drive_ratio(r.max_commons_whole,
						   (double)r.max_commons_whole_bias) >=
				    steep);
		if (r.max_commons_at_bias >= 2) {
			assert_true(gp_drive_ratio(r.max_commons_at_bias, a) >=
				    steep);
			assert_true(r.max_commons_at_bias < n);
		}
	}
}

/* --- descriptions --------------------------------------------------------- */

/* Twelve lines of glass around the sections under test, which therefore
 * start on line 13. */
static const char base[] = "glass:\n"
			   "  part: TST-1\n"
			   "  revision: A\n"
			   "front:\n"
			   "  size: [40, 30]\n"
			   "  position: [0, 0]\n"
			   "back:\n"
			   "  size: [40, 25]\n"
			   "  position: [0, 5]\n"
			   "viewing_area:\n"
			   "  position: [2, 8]\n"
			   "  size: [36, 20]\n";

/* One 1-line block of 5x8 cells: 8 commons. */
static const char block8[] = "blocks:\n"
			     "  b:\n"
			     "    origin: [3, 26]\n"
			     "    cells: [4, 1]\n"
			     "    dots: [5, 8]\n"
			     "    dot_size: [0.45, 0.5]\n"
			     "    dot_pitch: [0.5, 0.55]\n"
			     "    cell_pitch: 3\n"
			     "    line_pitch: 5\n";

struct loaded {
	struct gp_diag diag;
	struct gp_design *design;
	struct gp_drive_report report;
	bool resolved;
};

static void load(struct loaded *l, const char *first, const char *second)
{
	char text[4096];
	snprintf(text, sizeof(text), "%s%s%s", base, first,
		 second ? second : "");
	gp_diag_init(&l->diag);
	l->design = gp_design_load_buffer("t.yaml", text, strlen(text), NULL,
					  0, &l->diag);
	l->resolved = l->design &&
		      gp_design_drive(l->design, &l->report, &l->diag);
}

static void unload(struct loaded *l)
{
	gp_design_destroy(l->design);
	gp_diag_finish(&l->diag);
}

static const char *first_error(const struct loaded *l)
{
	for (size_t i = 0; i < l->diag.count; i++)
		if (l->diag.entries[i].severity == GP_SEVERITY_ERROR)
			return l->diag.entries[i].message;
	return "(no error)";
}

static void test_read_full(void **state)
{
	(void)state;
	struct loaded l;
	load(&l,
	     "drive:\n"
	     "  bias: best\n"
	     "  frame_rate: 80\n"
	     "optics:\n"
	     "  mode: negative\n"
	     "  type: transmissive\n"
	     "  viewing_direction: 12 o'clock\n"
	     "  fluid: HTN\n"
	     "  threshold: 1.8\n"
	     "  saturation: 2.2\n"
	     "  temperature_coefficient: -6 mV/C\n"
	     "  reference_temperature: 20\n"
	     "  operating_temperature: [-10, 60]\n"
	     "  storage_temperature: [-20, 70]\n"
	     "  glass_thickness: 0.55\n"
	     "  connection: pins\n"
	     "  polarizer: transmissive, anti-glare\n",
	     block8);
	assert_true(l.resolved);
	const struct gp_drive_spec *s = &l.design->drive;
	assert_int_equal(s->mode, GP_MODE_NEGATIVE);
	assert_int_equal(s->type, GP_TYPE_TRANSMISSIVE);
	assert_int_equal(s->viewing, GP_VIEWING_12);
	assert_int_equal(s->fluid, GP_FLUID_HTN);
	assert_int_equal(s->connection, GP_CONNECTION_PINS);
	assert_int_equal(s->tc_unit, GP_DRIVE_TC_MILLIVOLT);
	assert_int_equal(s->glass_thickness, 550000);
	assert_string_equal(s->polarizer, "transmissive, anti-glare");
	const struct gp_drive_result *r = &l.report.result;
	/* one line of 5x8 cells: 8 commons (issue 2's net order) */
	assert_int_equal(r->commons, 8);
	/* 'best' is the whole-number bias with the highest ratio: 1/4 gives
	 * 1.446 against 1/3's 1.414, next to the Alt & Pleshko 1974 optimum
	 * 1/3.828 with 1.447 */
	assert_near(r->bias, 4.0, 0.0);
	assert_near(r->ratio, 1.446, TOL3);
	assert_near(r->ratio_max, 1.447, TOL3);
	assert_true(r->feasible);
	assert_true(r->window.low < r->vop && r->vop < r->window.high);
	/* -6 mV/C on 1.8 V over 20 -> -10 degC: 1 + 0.18/1.8 = 1.1 */
	assert_near(r->cold.factor, 1.1, 1e-12);
	assert_near(r->hot.factor, 1.0 - 0.24 / 1.8, 1e-12);

	struct gp_buffer out;
	gp_buffer_init(&out);
	gp_drive_format(&l.report, &out);
	assert_false(out.failed);
	assert_non_null(strstr(out.data, "not a peak-to-peak value"));
	assert_non_null(strstr(out.data, "span of the bias ladder"));
	assert_non_null(strstr(out.data, "12 o'clock"));
	assert_non_null(strstr(out.data, "0.55 mm"));
	assert_non_null(strstr(out.data, "commons N                  8 "
					 "(duty 1/8)"));
	/* the ordering spec names the bias a driver gives */
	assert_non_null(strstr(out.data, "\n  bias                       1/4\n"));
	assert_null(strstr(out.data, "bias                       1/3.828"));
	assert_non_null(strstr(out.data, "\n  1/4       0.424     0.293     "
					 "1.446       99.9%  "));
	assert_non_null(strstr(out.data, "  V2 = (a-2)/a               "));
	assert_non_null(strstr(out.data, "V2 = V3 (5 taps)"));
	gp_buffer_finish(&out);

	gp_buffer_init(&out);
	gp_drive_format_json(&l.report, &out);
	struct json_object *json = json_tokener_parse(out.data);
	assert_non_null(json);
	struct json_object *multiplex, *commons, *order, *duty;
	assert_true(json_object_object_get_ex(json, "multiplex", &multiplex));
	assert_true(json_object_object_get_ex(multiplex, "commons", &commons));
	assert_int_equal(json_object_get_int(commons), 8);
	assert_true(json_object_object_get_ex(json, "order", &order));
	assert_true(json_object_object_get_ex(order, "duty", &duty));
	assert_string_equal(json_object_get_string(duty), "1/8");
	json_object_put(json);
	gp_buffer_finish(&out);
	unload(&l);
}

static void test_read_infeasible(void **state)
{
	(void)state;
	/* 1/64 duty, Vsat/Vth = 1.3: Alt & Pleshko 1974 limit 1.134 */
	struct loaded l;
	load(&l,
	     "drive:\n"
	     "  duty: 1/64\n"
	     "  bias: best\n"
	     "optics:\n"
	     "  threshold: 2\n"
	     "  saturation: 2.6\n",
	     NULL);
	assert_true(l.resolved);
	assert_false(l.report.result.feasible);
	assert_string_equal(
		first_error(&l),
		"t.yaml:15:9: duty 1/64 with bias 1/9 cannot switch this "
		"fluid: the selection ratio 1.134 is below Vsat/Vth = 1.300, "
		"so no Vop gives Voff <= Vth and Von >= Vsat; even the best "
		"bias 1/9 reaches only 1.134 (Alt-Pleshko limit); the largest "
		"duty that can is 1/15 with bias 1/4.873 (or the whole-number "
		"bias 1/5)");
	struct gp_buffer out;
	gp_buffer_init(&out);
	gp_drive_format(&l.report, &out);
	assert_non_null(strstr(out.data, "window                     EMPTY"));
	gp_buffer_finish(&out);
	unload(&l);
}

struct bad_case {
	const char *drive;
	const char *blocks;
	const char *message;
};

static void test_bad_input(void **state)
{
	(void)state;
	static const struct bad_case cases[] = {
		/* N < 1 is about the design, so it has no line */
		{ "optics:\n  threshold: 2\n", NULL,
		  "t.yaml: the design has no commons (N < 1), so there is "
		  "nothing to drive; add a display element, or give 'drive: "
		  "duty: 1/N' for a drive-only description" },
		{ "drive:\n  duty: 1/0\n", NULL,
		  "t.yaml:14:9: 'duty' 1/0 needs N from 1 to 100000 commons" },
		{ "drive:\n  duty: 1/4\n", block8,
		  "t.yaml:14:9: 'duty' 1/4 does not match the design, which "
		  "has 8 commons (duty 1/8); remove 'duty' or fix the design" },
		{ "drive:\n  bias: 1/1.5\n", block8,
		  "t.yaml:14:9: 'bias' 1/1.5 is outside 1/2 ... 1/(N+1): the "
		  "bias ladder needs a >= 2 in 1/a" },
		{ "drive:\n  bias: 1/10\n", block8,
		  "t.yaml:14:9: 'bias' 1/10 is outside 1/2 ... 1/9 for 8 "
		  "commons: a bias below 1/(N+1) only lowers the selection "
		  "ratio" },
		{ "drive:\n  bias: half\n", block8,
		  "t.yaml:14:9: 'bias' must be written 1/a (like 1/3 or "
		  "1/4) or 'best', got 'half'" },
		{ "drive:\n  bias: 1/4.5\n", block8,
		  "t.yaml:14:9: 'bias' 1/4.5 is not a bias a driver can give: "
		  "write a whole-number bias such as 1/4 or 1/5, or 'best' to "
		  "let glassplot choose" },
		{ "optics:\n  threshold: 2\n  saturation: 2\n", block8,
		  "t.yaml:15:15: 'saturation' 2 V must be above 'threshold' "
		  "2 V: saturation is the 90% contrast voltage, threshold the "
		  "10% one" },
		{ "optics:\n  threshold: 2.5\n  saturation: 2.4\n", block8,
		  "t.yaml:15:15: 'saturation' 2.4 V must be above 'threshold' "
		  "2.5 V: saturation is the 90% contrast voltage, threshold "
		  "the 10% one" },
		{ "optics:\n  threshold: -1.5\n", block8,
		  "t.yaml:14:14: 'threshold' cannot be negative (volts rms at "
		  "10% contrast), got -1.5" },
		{ "drive:\n  vop: -5\n", block8,
		  "t.yaml:14:8: 'vop' cannot be negative (volts, the full "
		  "ladder span), got -5" },
		{ "optics:\n  operating_temperature: [70, -20]\n", block8,
		  "t.yaml:14:26: 'operating_temperature' is upside down: 70 "
		  "is above -20; write [lowest, highest]" },
		{ "optics:\n  storage_temperature: [85, -40]\n", block8,
		  "t.yaml:14:24: 'storage_temperature' is upside down: 85 is "
		  "above -40; write [lowest, highest]" },
		{ "optics:\n  temperature_coefficient: -0.3\n", block8,
		  "t.yaml:14:28: 'temperature_coefficient' must be a number "
		  "with its unit, %/C (of the threshold) or mV/C, like '-0.3 "
		  "%/C' or '-8 mV/C'; got '-0.3'" },
		{ "optics:\n  threshold: 2\n  temperature_coefficient: -3 %/C\n"
		  "  operating_temperature: [-20, 70]\n",
		  block8,
		  "t.yaml:15:28: 'temperature_coefficient' takes the "
		  "threshold to 0 V or below at 70 \u00b0C; check its value "
		  "and unit" },
		{ "optics:\n  viewing_direction: 3 o'clock\n", block8,
		  "t.yaml:14:22: 'viewing_direction' value '3 o'clock' is not "
		  "known; did you mean '6 o'clock'? (one of: 6 o'clock, 12 "
		  "o'clock, 6, 12)" },
	};
	for (size_t i = 0; i < sizeof(cases) / sizeof(cases[0]); i++) {
		struct loaded l;
		load(&l, cases[i].drive, cases[i].blocks);
		if (l.resolved || strcmp(first_error(&l), cases[i].message))
			fail_msg("case %zu: resolved %d, got\n  %s\nexpected\n"
				 "  %s",
				 i, l.resolved, first_error(&l),
				 cases[i].message);
		unload(&l);
	}
}

static void test_static_description(void **state)
{
	(void)state;
	/* one common: static drive, bias ignored with a warning */
	struct loaded l;
	load(&l,
	     "drive:\n  duty: static\n  bias: 1/3\n"
	     "optics:\n  threshold: 1.5\n  saturation: 2\n",
	     NULL);
	assert_true(l.resolved);
	assert_true(l.report.result.is_static);
	/* LCD driver tables, from memory: static Von = Vop, Voff = 0 */
	assert_near(l.report.result.von, 1.0, TOL3);
	assert_near(l.report.result.voff, 0.0, TOL3);
	assert_int_equal(l.diag.errors, 0);
	assert_string_equal(l.diag.entries[0].message,
			    "t.yaml:15:9: 'bias' is ignored: one common is "
			    "static drive, which has no bias ladder");
	unload(&l);
}

/* Messages are for the user: where a value comes from belongs in the
 * source, not in what is printed. */
static void test_no_memory_in_messages(void **state)
{
	(void)state;
	struct loaded l;
	load(&l,
	     "drive:\n  bias: 1/3\n  frame_rate: 40\n"
	     "optics:\n  threshold: 1.8\n  saturation: 2.1\n"
	     "  temperature_coefficient: 0.2 %/C\n"
	     "  operating_temperature: [-50, 90]\n"
	     "  glass_thickness: 2\n",
	     block8);
	assert_true(l.resolved);
	assert_true(l.diag.count >= 4);
	for (size_t i = 0; i < l.diag.count; i++)
		assert_null(strstr(l.diag.entries[i].message, "from memory"));
	unload(&l);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_fractions_table),
		cmocka_unit_test(test_static),
		cmocka_unit_test(test_alt_pleshko),
		cmocka_unit_test(test_infeasible_64),
		cmocka_unit_test(test_feasible_window),
		cmocka_unit_test(test_bias_fix),
		cmocka_unit_test(test_levels),
		cmocka_unit_test(test_bias_table),
		cmocka_unit_test(test_no_memory_in_messages),
		cmocka_unit_test(test_temperature),
		cmocka_unit_test(test_timing),
		cmocka_unit_test(test_params_problems),
		cmocka_unit_test(test_single_threshold),
		cmocka_unit_test(test_window_property),
		cmocka_unit_test(test_read_full),
		cmocka_unit_test(test_read_infeasible),
		cmocka_unit_test(test_bad_input),
		cmocka_unit_test(test_static_description),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
