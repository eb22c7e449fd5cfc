/* Resolving the 'drive:' and 'optics:' sections (read by
 * lib/load/drive-read.c) against the design's number of commons. */
#include "drive.h"
#include "model.h"
#include "units.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Duty limits by fluid: common practice, no published source. */
static long usual_max_commons(enum gp_fluid fluid)
{
	switch (fluid) {
	case GP_FLUID_TN:
		return 16;
	case GP_FLUID_HTN:
		return 32;
	case GP_FLUID_STN:
	case GP_FLUID_FSTN:
		return 240;
	case GP_FLUID_UNSET:
		break;
	}
	return 240;
}

static bool resolve_commons(const struct gp_drive_spec *spec, long commons,
			    const struct gp_where *design_where,
			    struct gp_drive_report *report,
			    struct gp_diag *diag)
{
	if (commons < 1) {
		if (!spec->duty.given)
			return gp_diag_error(diag, design_where,
					     "the design has no commons "
					     "(N < 1), so there is nothing to "
					     "drive; add a display element, or "
					     "give 'drive: duty: 1/N' for a "
					     "drive-only description");
		report->commons = (long)spec->duty.value;
		report->duty_from_spec = true;
		return true;
	}
	if (commons > GP_DRIVE_MAX_COMMONS)
		return gp_diag_error(diag, design_where,
				     "the design has %ld commons; at most "
				     "%ld can be computed",
				     commons, GP_DRIVE_MAX_COMMONS);
	if (spec->duty.given && (long)spec->duty.value != commons)
		return gp_diag_error(diag, &spec->duty.where,
				     "'duty' 1/%ld does not match the "
				     "design, which has %ld commons (duty "
				     "1/%ld); remove 'duty' or fix the "
				     "design",
				     (long)spec->duty.value, commons, commons);
	report->commons = commons;
	return true;
}

static bool resolve_bias(const struct gp_drive_spec *spec, long commons,
			 struct gp_diag *diag)
{
	if (!spec->bias.given)
		return true;
	if (commons == 1) {
		gp_diag_warning(diag, &spec->bias.where,
				"'bias' is ignored: one common is static "
				"drive, which has no bias ladder");
		return true;
	}
	double a = spec->bias.value;
	if (a != 0.0 && a > (double)commons + 1.0) {
		char text[32];
		gp_drive_bias_text(text, sizeof(text), commons, a);
		return gp_diag_error(diag, &spec->bias.where,
				     "'bias' %s is outside 1/2 ... 1/%ld for "
				     "%ld commons: a bias below 1/(N+1) "
				     "only lowers the selection ratio",
				     text, commons + 1, commons);
	}
	return true;
}

static void fill_params(const struct gp_drive_spec *spec, long commons,
			struct gp_drive_params *p)
{
	memset(p, 0, sizeof(*p));
	p->commons = commons;
	p->bias = commons > 1 && spec->bias.given ? spec->bias.value : 0.0;
	p->vth = spec->threshold.given ? spec->threshold.value : 0.0;
	p->vsat = spec->saturation.given ? spec->saturation.value : 0.0;
	p->tc_unit = spec->coefficient.given ? spec->tc_unit :
					       GP_DRIVE_TC_NONE;
	p->tc = spec->coefficient.value;
	/* fluid data are usually quoted at 25 degC: common practice, no
	 * published source */
	p->t_ref = spec->reference_temperature.given ?
			   spec->reference_temperature.value :
			   25.0;
	p->has_range = spec->operating[0].given;
	p->t_min = spec->operating[0].value;
	p->t_max = spec->operating[1].value;
	p->frame_rate = spec->frame_rate.given ? spec->frame_rate.value : 0.0;
	p->vop = spec->vop.given ? spec->vop.value : 0.0;
}

static bool check_coefficient(const struct gp_drive_spec *spec,
			      const struct gp_drive_params *p,
			      struct gp_diag *diag)
{
	if (!p->has_range || p->tc_unit == GP_DRIVE_TC_NONE || p->vth <= 0.0)
		return true;
	double ends[2] = { p->t_min, p->t_max };
	for (int i = 0; i < 2; i++)
		if (!(gp_drive_factor(p, ends[i]) > 0.0))
			return gp_diag_error(diag, &spec->coefficient.where,
					     "'temperature_coefficient' "
					     "takes the threshold to 0 V or "
					     "below at %g \u00b0C; check its "
					     "value and unit",
					     ends[i]);
	return true;
}

static void warn_resolved(const struct gp_drive_report *report,
			  struct gp_diag *diag)
{
	const struct gp_drive_spec *spec = report->spec;
	const struct gp_drive_result *r = &report->result;
	struct gp_where file = { report->file, 0, 0 };
	static const char *const fluid_names[] = { "passive glass", "TN", "STN",
						   "FSTN", "HTN" };
	long usual = usual_max_commons(spec->fluid);
	if (r->commons > usual)
		gp_diag_warning(diag, spec->has_drive ? &spec->drive_where :
							&file,
				"duty 1/%ld is beyond the usual 1/%ld for %s "
				"(common practice, no published source)",
				r->commons, usual, fluid_names[spec->fluid]);
	if (!r->has_window || !r->feasible || !r->vop_given)
		return;
	if (!r->vop_in_window)
		gp_diag_warning(diag, &spec->vop.where,
				"'vop' %.3f V is outside the window %.3f to "
				"%.3f V at %g \u00b0C",
				r->vop, r->window.low, r->window.high,
				report->params.t_ref);
	const struct gp_drive_temperature *ends[2] = { &r->cold, &r->hot };
	bool inside[2] = { r->vop_in_window_cold, r->vop_in_window_hot };
	for (int i = 0; r->has_temperature && i < 2; i++)
		if (!inside[i])
			gp_diag_warning(diag, &spec->vop.where,
					"'vop' %.3f V is outside the window "
					"%.3f to %.3f V at %g \u00b0C; the "
					"drive needs temperature compensation",
					r->vop, ends[i]->window.low,
					ends[i]->window.high, ends[i]->t);
}

bool gp_drive_resolve_spec(const struct gp_drive_spec *spec, long commons,
			   const char *file, struct gp_drive_report *report,
			   struct gp_diag *diag)
{
	memset(report, 0, sizeof(*report));
	report->spec = spec;
	report->file = file;
	struct gp_where design_where = { file, 0, 0 };
	if (!resolve_commons(spec, commons, &design_where, report, diag) ||
	    !resolve_bias(spec, report->commons, diag))
		return false;
	fill_params(spec, report->commons, &report->params);
	if (!check_coefficient(spec, &report->params, diag))
		return false;
	const char *problem = gp_drive_params_problem(&report->params);
	if (problem)
		return gp_diag_error(diag, &design_where, "drive: %s", problem);
	gp_drive_compute(&report->params, &report->result);
	warn_resolved(report, diag);
	if (!report->result.feasible) {
		char advice[512];
		gp_drive_advice(report, advice, sizeof(advice));
		const struct gp_where *where =
			spec->bias.given ? &spec->bias.where :
			spec->duty.given ? &spec->duty.where :
					   &spec->saturation.where;
		gp_diag_error(diag, where, "%s", advice);
	}
	return true;
}
