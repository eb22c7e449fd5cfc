/* The checks in the pipeline: the limits taken from a design (its
 * 'electrical' section is read by lib/load/electrical-read.c) and the
 * check stage of a build. */
#include "check.h"

#include "drive.h"
#include "model.h"
#include "output.h"
#include "route.h"
#include "stage.h"

#include <string.h>

void gp_check_limits_from_design(struct gp_check_limits *l,
				 const struct gp_design *d)
{
	gp_check_limits_default(l);
	l->min_line = d->rules.min_line;
	l->min_space = d->rules.min_space;
	l->registration = d->rules.registration;
	l->edge_clearance = d->rules.edge_clearance;
	l->chord_tolerance = d->rules.chord_tolerance;
	l->registration_loss = d->rules.registration_loss;
	l->plate[GP_PLATE_FRONT] = d->front.box;
	l->plate[GP_PLATE_BACK] = d->back.box;
	l->viewing = d->viewing;
	if (d->routing && d->routing->seal.given) {
		struct gp_box outer;
		gp_seal_boxes(d, &l->seal_inside, &outer);
	}
	const struct gp_electrical *e = &d->electrical;
	l->sheet_resistance[0] = e->sheet_resistance[0];
	l->sheet_resistance[1] = e->sheet_resistance[1];
	l->cell_gap = (double)e->cell_gap * 1e-9;
	l->permittivity = e->permittivity;
	l->max_resistance = e->max_lead_resistance;
	l->conductor_pitch = e->conductor_pitch;
	/* else the conductor pitch of the first elastomeric ledge */
	for (size_t i = 0; d->routing && !l->conductor_pitch &&
			   i < d->routing->ledge_count;
	     i++)
		if (d->routing->ledges[i].connection == GP_LEDGE_ELASTOMERIC)
			l->conductor_pitch = d->routing->ledges[i].connector_pitch;
}

/* The drive as a finding: an empty operating-voltage window blocks
 * manufacture as surely as a short.  The pipeline resolved the drive
 * after the layout (build->drive), passed its warnings on and refused
 * bad drive input there. */
static bool check_drive(struct gp_build *build, struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	const struct gp_drive_report *report = &build->drive;
	if (!build->has_drive || report->result.feasible)
		return true;
	struct gp_finding f = {
		.rule = GP_CHECK_DRIVE,
		.severity = GP_SEVERITY_ERROR,
		.nets = { GP_NET_NONE, GP_NET_NONE },
		.place = { d->viewing.x0, d->viewing.y0 },
		.value = report->result.ratio,
		.limit = report->result.needed,
		.unit = GP_UNIT_RATIO,
		.pixel = -1,
		.shape = -1,
	};
	gp_drive_advice(report, f.text, sizeof(f.text));
	return gp_check_report_add(&build->checks, &f) ||
	       gp_diag_oom(diag, NULL);
}

bool gp_build_check(struct gp_build *build, struct gp_diag *diag)
{
	struct gp_check_limits limits;
	gp_check_limits_from_design(&limits, build->design);
	/* row time 1/(N f) with N the commons the layout made, as the drive
	 * computed it; not known without a frame rate */
	if (build->has_drive && build->drive.result.has_timing)
		limits.row_time = build->drive.result.row_time;
	/* pads: their ledge's clearance from the edge along it */
	for (size_t i = 0; i < build->ledge_count; i++) {
		const struct gp_ledge *l = &build->ledges[i];
		limits.pad_clearance[l->plate][l->side] = l->edge_clearance;
	}
	struct gp_geos *geos = gp_geos_create(diag);
	if (!geos)
		return gp_diag_oom(diag, NULL);
	gp_check_report_finish(&build->checks);
	bool ok = gp_check_run(geos, &build->art, &limits, &build->checks,
			       diag);
	gp_geos_destroy(geos);
	ok = ok && check_drive(build, diag);
	build->checked = ok;
	/* the reports, once: the accessors and report.txt/.json share them */
	build->check_text.size = build->check_json.size = 0;
	if (ok) {
		gp_check_format_text(&build->checks, &build->art,
				     build->design->part,
				     build->design->revision,
				     &build->check_text);
		gp_check_format_json(&build->checks, &build->art,
				     build->design->part,
				     build->design->revision,
				     &build->check_json);
	}
	if (ok)
		gp_buffer_printf(&build->notes,
				 "checks: %zu errors, %zu warnings, %zu pixels "
				 "checked\n",
				 build->checks.errors, build->checks.warnings,
				 build->checks.pixels_checked);
	return ok;
}

GP_EXPORT size_t gp_build_check_errors(const struct gp_build *build)
{
	return build->checks.errors;
}

GP_EXPORT size_t gp_build_check_warnings(const struct gp_build *build)
{
	return build->checks.warnings;
}

GP_EXPORT const char *gp_build_check_text(const struct gp_build *build)
{
	return build->check_text.data ? build->check_text.data : "";
}

GP_EXPORT const char *gp_build_check_json(const struct gp_build *build)
{
	return build->check_json.data ? build->check_json.data : "{}\n";
}

GP_EXPORT int gp_build_check_status(const struct gp_build *build, bool strict)
{
	return gp_check_exit_status(&build->checks, strict);
}

bool gp_build_add_check_reports(const struct gp_build *build,
				struct gp_output_set *set, struct gp_diag *diag)
{
	if (!gp_build_wants(build, GP_OUTPUT_REPORT) || !build->checked)
		return true;
	struct gp_buffer *text = gp_output_add(set, "report.txt", diag);
	if (!text)
		return false;
	gp_buffer_append(text, build->check_text.data, build->check_text.size);
	struct gp_buffer *json = gp_output_add(set, "report.json", diag);
	if (!json)
		return false;
	gp_buffer_append(json, build->check_json.data, build->check_json.size);
	return (!build->check_text.failed && !build->check_json.failed &&
		!text->failed && !json->failed) ||
	       gp_diag_oom(diag, NULL);
}
