/* Check reports as text and as JSON (json-c). */
#include "check.h"

#include "units.h"

#include <json-c/json.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#define REPORT_SCHEMA "glassplot-check-report-1"

static const char *severity_name(enum gp_severity s)
{
	return s == GP_SEVERITY_ERROR	 ? "error"
	       : s == GP_SEVERITY_WARNING ? "warning"
					  : "note";
}

static const char *net_name(const struct gp_artwork *art, int net)
{
	return net >= 0 && (size_t)net < art->net_count ? art->nets[net].name
							: NULL;
}

void gp_check_format_value(char *text, size_t size, double v,
			   enum gp_check_unit unit, bool typeset)
{
	switch (unit) {
	case GP_UNIT_MM:
		snprintf(text, size, "%.6g mm", v);
		break;
	case GP_UNIT_MM2:
		snprintf(text, size, typeset ? "%.6g mm\xc2\xb2" : "%.6g mm2", v);
		break;
	case GP_UNIT_FRACTION:
		snprintf(text, size, "%.4g%%", 100 * v);
		break;
	case GP_UNIT_OHM:
		snprintf(text, size, "%.4g ohm", v);
		break;
	case GP_UNIT_SECOND:
		snprintf(text, size, "%.4g s", v);
		break;
	default:
		snprintf(text, size, "%.4g", v);
		break;
	}
}

static void limits_text(const struct gp_check_limits *l, struct gp_buffer *out)
{
	gp_buffer_printf(out,
			 "limits: min_line %.4f mm, min_space %.4f mm, "
			 "registration %.4f mm (loss allowed %.2f%%), "
			 "edge_clearance %.4f mm\n",
			 gp_mm(l->min_line), gp_mm(l->min_space),
			 gp_mm(l->registration), 100 * l->registration_loss,
			 gp_mm(l->edge_clearance));
	gp_buffer_printf(out,
			 "electrical: sheet resistance %.4g / %.4g ohm/square "
			 "(front / back), cell gap %.4g um, permittivity %.4g, "
			 "eps0 %.10e F/m (CODATA 2018)",
			 l->sheet_resistance[0], l->sheet_resistance[1],
			 l->cell_gap * 1e6, l->permittivity, GP_EPSILON_0);
	if (l->row_time > 0)
		gp_buffer_printf(out, ", row time %.4g s", l->row_time);
	gp_buffer_puts(out, "\n");
}


struct tau_sort {
	const struct gp_check_report *report;
	size_t index;
};

static int by_tau(const void *pa, const void *pb)
{
	const struct tau_sort *a = pa, *b = pb;
	double ta = a->report->nets[a->index].tau;
	double tb = b->report->nets[b->index].tau;
	if (ta != tb)
		return ta > tb ? -1 : 1;
	return a->index < b->index ? -1 : a->index > b->index;
}

void gp_check_format_text(const struct gp_check_report *r,
			  const struct gp_artwork *art, const char *part,
			  const char *revision, struct gp_buffer *out)
{
	gp_buffer_printf(out, "design-rule report: %s revision %s\n",
			 part ? part : "?", revision ? revision : "?");
	limits_text(&r->limits, out);
	if (r->notes.size)
		gp_buffer_append(out, r->notes.data, r->notes.size);
	gp_buffer_printf(out, "findings: %zu errors, %zu warnings; %zu "
			 "pixels checked\n", r->errors, r->warnings,
			 r->pixels_checked);
	for (size_t i = 0; i < r->count; i++) {
		const struct gp_finding *f = &r->findings[i];
		char value[48], limit[48], x[32], y[32];
		gp_check_format_value(value, sizeof(value), f->value, f->unit,
				      false);
		gp_check_format_value(limit, sizeof(limit), f->limit, f->unit,
				      false);
		gp_format_mm(x, sizeof(x), f->place.x);
		gp_format_mm(y, sizeof(y), f->place.y);
		const char *a = net_name(art, f->nets[0]);
		const char *b = net_name(art, f->nets[1]);
		gp_buffer_printf(out, "%s %s%s%s%s%s at (%s, %s) mm: %s "
				 "[value %s, limit %s]\n",
				 severity_name(f->severity),
				 gp_check_rule_name(f->rule), a ? " " : "",
				 a ? a : "", b ? " " : "", b ? b : "", x, y,
				 f->text, value, limit);
	}
	/* the slowest nets: what the RC check looked at */
	size_t n = r->net_count, shown = 0;
	struct tau_sort *order = calloc(n ? n : 1, sizeof(*order));
	if (!order)
		return;
	for (size_t i = 0; i < n; i++)
		order[i] = (struct tau_sort){ r, i };
	qsort(order, n, sizeof(*order), by_tau);
	for (size_t i = 0; i < n && shown < 5; i++) {
		const struct gp_net_load *l = &r->nets[order[i].index];
		if (l->tau <= 0)
			break;
		if (shown++ == 0)
			gp_buffer_puts(out, "slowest nets (R, C, RC):\n");
		gp_buffer_printf(out, "  %s: %.4g ohm, %.4g F, %.4g s\n",
				 art->nets[order[i].index].name,
				 l->resistance, l->capacitance, l->tau);
	}
	free(order);
}

static json_object *number(double v)
{
	return json_object_new_double(isfinite(v) ? v : 0);
}

static json_object *limits_json(const struct gp_check_limits *l)
{
	json_object *o = json_object_new_object();
	json_object_object_add(o, "min_line_mm", number(gp_mm(l->min_line)));
	json_object_object_add(o, "min_space_mm", number(gp_mm(l->min_space)));
	json_object_object_add(o, "registration_mm",
			       number(gp_mm(l->registration)));
	json_object_object_add(o, "registration_loss",
			       number(l->registration_loss));
	json_object_object_add(o, "edge_clearance_mm",
			       number(gp_mm(l->edge_clearance)));
	json_object *sheet = json_object_new_object();
	json_object_object_add(sheet, "front", number(l->sheet_resistance[0]));
	json_object_object_add(sheet, "back", number(l->sheet_resistance[1]));
	json_object_object_add(o, "sheet_resistance_ohm_per_square", sheet);
	json_object_object_add(o, "cell_gap_m", number(l->cell_gap));
	json_object_object_add(o, "permittivity", number(l->permittivity));
	json_object_object_add(o, "epsilon0_f_per_m", number(GP_EPSILON_0));
	json_object_object_add(o, "row_time_s",
			       l->row_time > 0 ? number(l->row_time) : NULL);
	return o;
}

static json_object *finding_json(const struct gp_finding *f,
				 const struct gp_artwork *art)
{
	json_object *o = json_object_new_object();
	json_object_object_add(o, "rule", json_object_new_string(
						   gp_check_rule_name(f->rule)));
	json_object_object_add(o, "severity", json_object_new_string(
						       severity_name(f->severity)));
	json_object *nets = json_object_new_array();
	for (int i = 0; i < 2; i++) {
		const char *name = net_name(art, f->nets[i]);
		if (name)
			json_object_array_add(nets,
					      json_object_new_string(name));
	}
	json_object_object_add(o, "nets", nets);
	json_object_object_add(o, "x_mm", number(gp_mm(f->place.x)));
	json_object_object_add(o, "y_mm", number(gp_mm(f->place.y)));
	json_object_object_add(o, "value", number(f->value));
	json_object_object_add(o, "limit", number(f->limit));
	json_object_object_add(o, "unit", json_object_new_string(
						   gp_check_unit_name(f->unit)));
	json_object_object_add(o, "pixel",
			       f->pixel >= 0 ? json_object_new_int(f->pixel)
					     : NULL);
	json_object_object_add(o, "message", json_object_new_string(f->text));
	return o;
}

static json_object *nets_json(const struct gp_check_report *r,
			      const struct gp_artwork *art)
{
	json_object *list = json_object_new_array();
	for (size_t i = 0; i < r->net_count; i++) {
		const struct gp_net_load *l = &r->nets[i];
		json_object *o = json_object_new_object();
		json_object_object_add(o, "name", json_object_new_string(
							  art->nets[i].name));
		json_object_object_add(o, "pixels",
				       json_object_new_int64((int64_t)l->pixels));
		json_object_object_add(o, "lead_squares",
				       number(l->lead_squares));
		json_object_object_add(o, "line_squares",
				       number(l->line_squares));
		json_object_object_add(o, "resistance_ohm",
				       number(l->resistance));
		json_object_object_add(o, "capacitance_f",
				       number(l->capacitance));
		json_object_object_add(o, "tau_s", number(l->tau));
		json_object_array_add(list, o);
	}
	return list;
}

void gp_check_format_json(const struct gp_check_report *r,
			  const struct gp_artwork *art, const char *part,
			  const char *revision, struct gp_buffer *out)
{
	json_object *o = json_object_new_object();
	json_object_object_add(o, "schema",
			       json_object_new_string(REPORT_SCHEMA));
	json_object_object_add(o, "part",
			       json_object_new_string(part ? part : ""));
	json_object_object_add(o, "revision",
			       json_object_new_string(revision ? revision : ""));
	json_object *summary = json_object_new_object();
	json_object_object_add(summary, "errors",
			       json_object_new_int64((int64_t)r->errors));
	json_object_object_add(summary, "warnings",
			       json_object_new_int64((int64_t)r->warnings));
	json_object_object_add(summary, "pixels_checked",
			       json_object_new_int64(
				       (int64_t)r->pixels_checked));
	json_object_object_add(o, "summary", summary);
	json_object_object_add(o, "limits", limits_json(&r->limits));
	json_object *notes = json_object_new_array();
	const char *p = r->notes.data ? r->notes.data : "";
	while (*p) {
		const char *end = p;
		while (*end && *end != '\n')
			end++;
		json_object_array_add(notes, json_object_new_string_len(
						     p, (int)(end - p)));
		p = *end ? end + 1 : end;
	}
	json_object_object_add(o, "notes", notes);
	json_object *findings = json_object_new_array();
	for (size_t i = 0; i < r->count; i++)
		json_object_array_add(findings,
				      finding_json(&r->findings[i], art));
	json_object_object_add(o, "findings", findings);
	json_object_object_add(o, "nets", nets_json(r, art));
	gp_buffer_puts(out, json_object_to_json_string_ext(
				    o, JSON_C_TO_STRING_PRETTY |
					       JSON_C_TO_STRING_NOSLASHESCAPE));
	gp_buffer_puts(out, "\n");
	json_object_put(o);
}

int gp_check_exit_status(const struct gp_check_report *r, bool strict)
{
	return r->errors > 0 || (strict && r->warnings > 0) ? 1 : 0;
}
