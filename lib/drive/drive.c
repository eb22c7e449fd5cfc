/* Multiplex drive arithmetic; see drive.h for the conventions.
 *
 * The RMS formulas, derived for line-at-a-time addressing of N commons with
 * bias 1/a and full amplitude Vop (ladder levels V0 = Vop ... 0 V):
 *
 *   During its own row time a pixel sees the selected common against its
 *   segment: Vop if the segment drives it on, Vop - 2 Vop/a = Vop (a-2)/a if
 *   off (the segment sits 2 Vop/a from the opposite end of the ladder).
 *   During the other N-1 row times the common is non-selected and the pixel
 *   sees +-Vop/a whatever the data.  Averaging the squares over a frame:
 *
 *     Von^2  = Vop^2 (a^2 + N - 1)       / (N a^2)
 *     Voff^2 = Vop^2 ((a - 2)^2 + N - 1) / (N a^2)
 *
 *   so the selection ratio is
 *
 *     Von/Voff = sqrt((a^2 + N - 1) / ((a - 2)^2 + N - 1)).
 *
 *   d/da of its logarithm vanishes where a^2 - 2a - (N - 1) = 0, i.e. at
 *   a = sqrt(N) + 1, the one maximum for a > 0; substituting gives the
 *   Alt-Pleshko limit sqrt((sqrt(N) + 1) / (sqrt(N) - 1)) (Alt and Pleshko,
 *   IEEE Trans. Electron Devices ED-21, 1974).
 *
 *   Static drive (N = 1) uses no ladder: the segment is in phase with the
 *   common (0 V across the pixel) or in antiphase (+-Vop, a square wave of
 *   RMS Vop), so Von = Vop and Voff = 0.  The general formula agrees at
 *   N = 1, a = 2, but static glass is ordered and driven as its own case.
 */
#include "drive.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

void gp_drive_fractions(long commons, double a, double *von, double *voff)
{
	if (commons <= 1) {
		*von = 1.0;
		*voff = 0.0;
		return;
	}
	double n = (double)commons;
	double denominator = n * a * a;
	*von = sqrt((a * a + n - 1.0) / denominator);
	*voff = sqrt(((a - 2.0) * (a - 2.0) + n - 1.0) / denominator);
}

double gp_drive_ratio(long commons, double a)
{
	if (commons <= 1)
		return INFINITY;
	double n = (double)commons;
	return sqrt((a * a + n - 1.0) / ((a - 2.0) * (a - 2.0) + n - 1.0));
}

double gp_drive_ratio_max(long commons)
{
	if (commons <= 1)
		return INFINITY;
	double s = sqrt((double)commons);
	return sqrt((s + 1.0) / (s - 1.0));
}

double gp_drive_best_bias(long commons)
{
	if (commons <= 1)
		return 2.0;
	return sqrt((double)commons) + 1.0;
}

long gp_drive_best_whole_bias(long commons)
{
	if (commons <= 2)
		return 2;
	/* the ratio is unimodal in a, so the best whole a is next to the
	 * real optimum */
	long below = (long)floor(gp_drive_best_bias(commons));
	long above = below + 1;
	if (above > commons + 1)
		return below;
	/* a tie goes to the smaller ladder */
	double gain = gp_drive_ratio(commons, (double)above) /
		      gp_drive_ratio(commons, (double)below);
	return gain > 1.0 + 1e-12 ? above : below;
}

long gp_drive_max_commons(double ratio)
{
	if (!(ratio > 1.0))
		return GP_DRIVE_MAX_COMMONS;
	/* (s+1)/(s-1) >= r^2  <=>  s <= (r^2+1)/(r^2-1), s = sqrt(N) */
	double r2 = ratio * ratio;
	double s = (r2 + 1.0) / (r2 - 1.0);
	double n = floor(s * s);
	if (n >= (double)GP_DRIVE_MAX_COMMONS)
		return GP_DRIVE_MAX_COMMONS;
	long commons = (long)n;
	/* guard the floor against rounding either way */
	while (commons > 1 && gp_drive_ratio_max(commons) < ratio)
		commons--;
	while (commons < GP_DRIVE_MAX_COMMONS &&
	       gp_drive_ratio_max(commons + 1) >= ratio)
		commons++;
	return commons;
}

long gp_drive_max_commons_at_bias(double ratio, double a)
{
	if (!(ratio > 1.0))
		return GP_DRIVE_MAX_COMMONS;
	/* a^2 + M >= r^2 ((a-2)^2 + M), M = N - 1
	 * <=>  M <= (a^2 - r^2 (a-2)^2) / (r^2 - 1); the ratio falls as N
	 * grows, so this bounds N from above */
	double r2 = ratio * ratio;
	double m = (a * a - r2 * (a - 2.0) * (a - 2.0)) / (r2 - 1.0);
	if (!(m >= 1.0))
		return 0;
	double n = floor(m) + 1.0;
	long commons = n >= (double)GP_DRIVE_MAX_COMMONS ?
			       GP_DRIVE_MAX_COMMONS :
			       (long)n;
	/* guard the floor against rounding either way */
	while (commons > 2 && gp_drive_ratio(commons, a) < ratio)
		commons--;
	while (commons < GP_DRIVE_MAX_COMMONS &&
	       gp_drive_ratio(commons + 1, a) >= ratio)
		commons++;
	/* 1/a bias is only usable from N = a - 1 up */
	if (gp_drive_ratio(commons, a) < ratio || (double)commons + 1.0 < a)
		return 0;
	return commons;
}

long gp_drive_max_commons_whole(double ratio, long *bias)
{
	*bias = 0;
	long commons = gp_drive_max_commons(ratio);
	/* the whole-number bias loses a little against the real optimum, so
	 * the answer is at most a few steps below */
	for (; commons >= 2; commons--) {
		long a = gp_drive_best_whole_bias(commons);
		if (gp_drive_ratio(commons, (double)a) >= ratio) {
			*bias = a;
			return commons;
		}
	}
	return 0;
}

bool gp_drive_bias_range(long commons, double ratio, double *low,
			 double *high)
{
	if (commons <= 1) {
		*low = *high = 2.0;
		return true;
	}
	double n = (double)commons;
	double lo = 2.0, hi = n + 1.0;
	double best = gp_drive_best_bias(commons);
	if (gp_drive_ratio(commons, best) < ratio)
		return false;
	/* R(a) >= r  <=>  (r^2 - 1) a^2 - 4 r^2 a + (r^2 - 1)(N - 1) + 4 r^2
	 * <= 0, a quadratic whose roots bracket the working biases */
	double r2 = ratio * ratio;
	double qa = r2 - 1.0, qb = -4.0 * r2,
	       qc = (r2 - 1.0) * (n - 1.0) + 4.0 * r2;
	if (qa <= 0.0) {
		*low = lo;
		*high = hi;
		return true;
	}
	double disc = qb * qb - 4.0 * qa * qc;
	if (disc < 0.0)
		disc = 0.0;
	double root = sqrt(disc);
	double a1 = (-qb - root) / (2.0 * qa);
	double a2 = (-qb + root) / (2.0 * qa);
	*low = a1 > lo ? a1 : lo;
	*high = a2 < hi ? a2 : hi;
	return *low <= *high;
}

static int compare_down(const void *a, const void *b)
{
	double x = *(const double *)a, y = *(const double *)b;
	return (x < y) - (x > y);
}

/* levels closer than this are one tap of the ladder */
#define SAME_LEVEL 1e-12

static void find_taps(double a, struct gp_drive_levels *levels)
{
	double sorted[GP_DRIVE_MAX_LEVELS];
	memcpy(sorted, levels->fraction, sizeof(sorted));
	qsort(sorted, GP_DRIVE_MAX_LEVELS, sizeof(double), compare_down);
	for (size_t i = 0; i < GP_DRIVE_MAX_LEVELS; i++) {
		if (levels->taps &&
		    fabs(levels->tap[levels->taps - 1] - sorted[i]) < SAME_LEVEL)
			continue;
		levels->tap[levels->taps++] = sorted[i];
	}
	for (size_t i = 0; i + 1 < levels->taps; i++)
		levels->resistor[i] =
			(levels->tap[i] - levels->tap[i + 1]) * a;
}

void gp_drive_levels(long commons, double a, double vop,
		     struct gp_drive_levels *levels)
{
	memset(levels, 0, sizeof(*levels));
	for (size_t i = 0; i < GP_DRIVE_MAX_LEVELS; i++)
		levels->same_as[i] = -1;
	if (commons <= 1) {
		levels->count = levels->taps = 2;
		levels->fraction[0] = levels->tap[0] = 1.0;
		levels->volts[0] = vop;
		levels->resistor[0] = 1.0;
		return;
	}
	/* the usual driver order, V0..V5 */
	const double fraction[GP_DRIVE_MAX_LEVELS] = {
		1.0, (a - 1.0) / a, (a - 2.0) / a, 2.0 / a, 1.0 / a, 0.0,
	};
	levels->count = GP_DRIVE_MAX_LEVELS;
	for (size_t i = 0; i < GP_DRIVE_MAX_LEVELS; i++) {
		levels->fraction[i] = fraction[i];
		levels->volts[i] = vop * fraction[i];
		for (size_t j = 0; j < i && levels->same_as[i] < 0; j++)
			if (fabs(fraction[j] - fraction[i]) < SAME_LEVEL)
				levels->same_as[i] = (int)j;
	}
	find_taps(a, levels);
}

void gp_drive_bias_span(long commons, long *low, long *high)
{
	if (commons <= 1) {
		*low = *high = 0;
		return;
	}
	/* the optimum is whole for square N: the tolerance keeps 1/3 at
	 * N = 4 from counting as above it */
	long above = (long)ceil(gp_drive_best_bias(commons) - 1e-9) + 1;
	*high = above < commons + 1 ? above : commons + 1;
	*low = *high - (GP_DRIVE_BIAS_ROWS - 1) > 2 ?
		       *high - (GP_DRIVE_BIAS_ROWS - 1) :
		       2;
}

double gp_drive_factor(const struct gp_drive_params *params, double t)
{
	double dt = t - params->t_ref;
	switch (params->tc_unit) {
	case GP_DRIVE_TC_PERCENT:
		return 1.0 + params->tc / 100.0 * dt;
	case GP_DRIVE_TC_MILLIVOLT:
		if (params->vth > 0.0)
			return 1.0 + params->tc / 1000.0 * dt / params->vth;
		break;
	case GP_DRIVE_TC_NONE:
		break;
	}
	return 1.0;
}

const char *gp_drive_params_problem(const struct gp_drive_params *params)
{
	if (params->commons < 1)
		return "the design has no commons (N < 1)";
	if (params->commons > GP_DRIVE_MAX_COMMONS)
		return "too many commons";
	if (params->commons > 1 && params->bias != 0.0 &&
	    (!(params->bias >= 2.0) ||
	     !(params->bias <= (double)params->commons + 1.0)))
		return "bias outside 1/2 ... 1/(N+1)";
	if (!(params->vth >= 0.0) || !isfinite(params->vth))
		return "threshold must not be negative";
	if (params->vth == 0.0 && params->vsat != 0.0)
		return "saturation given without a threshold";
	if (params->vsat != 0.0 &&
	    (!(params->vsat > params->vth) || !isfinite(params->vsat)))
		return "saturation must be above the threshold";
	if (params->vop < 0.0 || !isfinite(params->vop))
		return "Vop must not be negative";
	if (params->frame_rate < 0.0 || !isfinite(params->frame_rate))
		return "frame rate must not be negative";
	if (params->has_range && !(params->t_min <= params->t_max))
		return "temperature range upside down";
	return NULL;
}

/* window for fractions von/voff and the fluid, scaled by factor */
static void make_window(double von, double voff, double vth, double vsat,
			double factor, struct gp_drive_window *w)
{
	double on_target = (vsat > 0.0 ? vsat : vth) * factor;
	w->low = on_target / von;
	w->high = voff > 0.0 ? vth * factor / voff : INFINITY;
	w->empty = w->low > w->high;
	if (w->empty) {
		w->recommended = 0.0;
		w->margin = 0.0;
		return;
	}
	if (isinf(w->high))
		/* static: headroom above saturation, common practice, no
		 * published source */
		w->recommended = w->low * 1.25;
	else if (vsat > 0.0)
		/* geometric middle: the same relative margin to both edges,
		 * since Vop errors (temperature, cell gap, supply) are
		 * proportional */
		w->recommended = sqrt(w->low * w->high);
	else
		/* single threshold: put Voff on the threshold, the textbook
		 * choice that gives Von = ratio * Vth */
		w->recommended = w->high;
	w->margin = w->recommended / w->low - 1.0;
}

static bool in_window(const struct gp_drive_window *w, double vop)
{
	/* a part per million of slack so that a Vop read back from a printed
	 * window edge still counts as inside */
	return !w->empty && vop >= w->low * (1.0 - 1e-6) &&
	       vop <= w->high * (1.0 + 1e-6);
}

static void compute_multiplex(const struct gp_drive_params *p,
			      struct gp_drive_result *r)
{
	r->commons = p->commons;
	r->is_static = p->commons == 1;
	r->bias_by_rule = p->bias == 0.0;
	r->bias = r->is_static	  ? 2.0 :
		  r->bias_by_rule ? (double)gp_drive_best_whole_bias(p->commons) :
				    p->bias;
	gp_drive_fractions(p->commons, r->bias, &r->von, &r->voff);
	r->ratio = gp_drive_ratio(p->commons, r->bias);
	r->ratio_max = gp_drive_ratio_max(p->commons);
	r->best_bias = gp_drive_best_bias(p->commons);
	r->best_whole_bias = gp_drive_best_whole_bias(p->commons);
	r->best_whole_ratio =
		gp_drive_ratio(p->commons, (double)r->best_whole_bias);
	r->needed = p->vsat > 0.0 ? p->vsat / p->vth : 0.0;
}

static void add_bias_row(const struct gp_drive_params *p,
			 struct gp_drive_result *r, long a)
{
	struct gp_drive_bias_row *row = &r->biases[r->bias_rows++];
	row->a = a;
	gp_drive_fractions(p->commons, (double)a, &row->von, &row->voff);
	row->ratio = gp_drive_ratio(p->commons, (double)a);
	row->share = row->ratio / r->ratio_max;
	if (p->vth > 0.0)
		make_window(row->von, row->voff, p->vth, p->vsat, 1.0,
			    &row->window);
	if ((double)a == r->bias)
		r->chosen_row = r->bias_rows - 1;
}

/* The whole-number biases: the span, with a given one outside it in its
 * place in the order. */
static void compute_biases(const struct gp_drive_params *p,
			   struct gp_drive_result *r)
{
	r->chosen_row = GP_DRIVE_BIAS_ROWS + 1;
	if (r->is_static) {
		r->chosen_row = 0;
		return;
	}
	long low, high;
	gp_drive_bias_span(p->commons, &low, &high);
	bool whole = r->bias == floor(r->bias);
	long given = (long)r->bias;
	if (whole && given < low)
		add_bias_row(p, r, given);
	for (long a = low; a <= high; a++)
		add_bias_row(p, r, a);
	if (whole && given > high)
		add_bias_row(p, r, given);
	if (r->chosen_row > r->bias_rows)
		r->chosen_row = r->bias_rows;
}

static void compute_window(const struct gp_drive_params *p,
			   struct gp_drive_result *r)
{
	r->has_window = p->vth > 0.0;
	if (r->has_window)
		make_window(r->von, r->voff, p->vth, p->vsat, 1.0,
			    &r->window);
	r->feasible = !r->window.empty;
	if (!r->feasible) {
		r->max_commons = gp_drive_max_commons(r->needed);
		r->max_commons_at_bias =
			gp_drive_max_commons_at_bias(r->needed, r->bias);
		r->max_commons_whole = gp_drive_max_commons_whole(
			r->needed, &r->max_commons_whole_bias);
		r->bias_fix = gp_drive_bias_range(p->commons, r->needed,
						  &r->bias_low, &r->bias_high);
	}
	r->vop_given = p->vop > 0.0;
	r->vop = r->vop_given ? p->vop : r->window.recommended;
	r->vop_in_window = in_window(&r->window, r->vop);
	gp_drive_levels(p->commons, r->bias, r->vop, &r->levels);
}

static void compute_temperature(const struct gp_drive_params *p,
				struct gp_drive_result *r)
{
	r->has_range = p->has_range && r->has_window;
	r->has_temperature = r->has_range && p->tc_unit != GP_DRIVE_TC_NONE;
	if (!r->has_range)
		return;
	struct gp_drive_temperature *ends[2] = { &r->cold, &r->hot };
	double ts[2] = { p->t_min, p->t_max };
	for (int i = 0; i < 2; i++) {
		ends[i]->t = ts[i];
		ends[i]->factor = gp_drive_factor(p, ts[i]);
		if (!(ends[i]->factor > 0.0)) {
			r->factor_invalid = true;
			ends[i]->factor = 0.0;
			ends[i]->window.empty = true;
			continue;
		}
		make_window(r->von, r->voff, p->vth, p->vsat,
			    ends[i]->factor, &ends[i]->window);
	}
	if (r->factor_invalid) {
		r->common_empty = true;
		return;
	}
	/* the window scales with f(T), linear in T, so its ends bound it */
	double f_high = fmax(r->cold.factor, r->hot.factor);
	double f_low = fmin(r->cold.factor, r->hot.factor);
	r->common_low = r->window.low * f_high;
	r->common_high = r->window.high * f_low;
	r->common_empty = r->window.empty || r->common_low > r->common_high;
	r->vop_in_window_cold = in_window(&r->cold.window, r->vop);
	r->vop_in_window_hot = in_window(&r->hot.window, r->vop);
}

static void compute_timing(const struct gp_drive_params *p,
			   struct gp_drive_result *r)
{
	r->has_timing = p->frame_rate > 0.0;
	if (!r->has_timing)
		return;
	r->frame_period = 1.0 / p->frame_rate;
	r->row_time = r->frame_period / (double)p->commons;
	/* line inversion (type A) reverses polarity within every row time,
	 * so each row holds both halves and the waveform repeats every
	 * frame; frame inversion (type B) alternates whole frames and
	 * repeats every second frame */
	r->half_row_time = r->row_time / 2.0;
	r->cycle_line = r->frame_period;
	r->cycle_frame = 2.0 * r->frame_period;
	r->flicker = p->frame_rate < GP_DRIVE_FLICKER_HZ;
	r->power = p->frame_rate > GP_DRIVE_POWER_HZ;
}

bool gp_drive_compute(const struct gp_drive_params *params,
		      struct gp_drive_result *result)
{
	memset(result, 0, sizeof(*result));
	if (gp_drive_params_problem(params))
		return false;
	compute_multiplex(params, result);
	compute_window(params, result);
	compute_biases(params, result);
	compute_temperature(params, result);
	compute_timing(params, result);
	return true;
}
