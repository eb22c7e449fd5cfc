/* The drive and ordering spec as text and JSON. */
#include "drive.h"
#include "units.h"

#include <json-c/json.h>

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#define VOP_MEANING_1                                                      \
	"Vop is the full drive amplitude: the span of the bias ladder from " \
	"V0 down to 0 V."
#define VOP_MEANING_2                                                      \
	"It is not a peak-to-peak value (a pixel sees up to +Vop and -Vop, " \
	"2 Vop peak-to-peak)."

#define COMMON_PRACTICE "common practice, no published source"

void gp_drive_bias_text(char *text, size_t size, long commons, double a)
{
	if (commons <= 1)
		snprintf(text, size, "static");
	else if (a == floor(a))
		snprintf(text, size, "1/%.0f", a);
	else
		snprintf(text, size, "1/%.3f", a);
}

static void append(char *text, size_t size, const char *format, ...)
	__attribute__((format(printf, 3, 4)));

static void append(char *text, size_t size, const char *format, ...)
{
	size_t used = strlen(text);
	if (used + 1 >= size)
		return;
	va_list args;
	va_start(args, format);
	vsnprintf(text + used, size - used, format, args);
	va_end(args);
}

void gp_drive_advice(const struct gp_drive_report *report, char *text,
		     size_t size)
{
	const struct gp_drive_result *r = &report->result;
	text[0] = '\0';
	if (r->feasible)
		return;
	char bias[32];
	gp_drive_bias_text(bias, sizeof(bias), r->commons, r->bias);
	append(text, size,
	       "duty 1/%ld with bias %s cannot switch this fluid: the "
	       "selection ratio %.3f is below Vsat/Vth = %.3f, so no Vop "
	       "gives Voff <= Vth and Von >= Vsat",
	       r->commons, bias, r->ratio, r->needed);
	char best[32];
	gp_drive_bias_text(best, sizeof(best), r->commons, r->best_bias);
	if (r->bias_fix) {
		append(text, size,
		       "; a bias from 1/%.3f to 1/%.3f would work (best %s, "
		       "ratio %.3f)",
		       r->bias_low, r->bias_high, best, r->ratio_max);
		long lo = (long)ceil(r->bias_low), hi = (long)floor(r->bias_high);
		if (lo < hi)
			append(text, size, ", whole numbers 1/%ld to 1/%ld", lo,
			       hi);
		else if (lo == hi)
			append(text, size, ", the whole number 1/%ld", lo);
		else
			append(text, size, ", but no whole-number bias a "
					   "driver can give");
		return;
	}
	append(text, size,
	       "; even the best bias %s reaches only %.3f (Alt-Pleshko "
	       "limit)",
	       best, r->ratio_max);
	if (r->max_commons < 2) {
		append(text, size, "; only static drive can");
	} else {
		gp_drive_bias_text(best, sizeof(best), r->max_commons,
				   gp_drive_best_bias(r->max_commons));
		append(text, size,
		       "; the largest duty that can is 1/%ld with bias %s",
		       r->max_commons, best);
		if (r->max_commons_whole == r->max_commons &&
		    (double)r->max_commons_whole_bias !=
			    gp_drive_best_bias(r->max_commons))
			append(text, size, " (or the whole-number bias 1/%ld)",
			       r->max_commons_whole_bias);
		else if (r->max_commons_whole >= 2 &&
			 r->max_commons_whole != r->max_commons)
			append(text, size,
			       " (with a whole-number bias: 1/%ld at 1/%ld)",
			       r->max_commons_whole,
			       r->max_commons_whole_bias);
	}
	if (!r->bias_by_rule && r->max_commons_at_bias >= 2)
		append(text, size, "; keeping bias %s, up to 1/%ld", bias,
		       r->max_commons_at_bias);
}

/* --- text ----------------------------------------------------------------- */

static void time_text(char *text, size_t size, double seconds)
{
	if (seconds >= 1e-3)
		snprintf(text, size, "%.3f ms", seconds * 1e3);
	else
		snprintf(text, size, "%.1f \u00b5s", seconds * 1e6);
}

static void line(struct gp_buffer *out, const char *label, const char *format,
		 ...) __attribute__((format(printf, 3, 4)));

/* "  label ....... value": labels padded to one column */
static void line(struct gp_buffer *out, const char *label, const char *format,
		 ...)
{
	char value[512];
	va_list args;
	va_start(args, format);
	vsnprintf(value, sizeof(value), format, args);
	va_end(args);
	/* pad by characters, not bytes: labels may hold a UTF-8 degree sign */
	size_t width = 0;
	for (const char *p = label; *p; p++)
		width += ((unsigned char)*p & 0xc0) != 0x80;
	gp_buffer_printf(out, "  %s%*s %s\n", label,
			 width < 26 ? (int)(26 - width) : 0, "", value);
}

static void format_multiplex(const struct gp_drive_report *report,
			     struct gp_buffer *out)
{
	const struct gp_drive_result *r = &report->result;
	char bias[32], best[32];
	gp_drive_bias_text(bias, sizeof(bias), r->commons, r->bias);
	gp_drive_bias_text(best, sizeof(best), r->commons, r->best_bias);
	gp_buffer_puts(out, "Multiplex\n");
	if (r->is_static) {
		line(out, "commons N", "1 (static drive)%s",
		     report->duty_from_spec ? ", from 'duty'" : "");
		line(out, "bias", "none: each segment is in phase (off) or "
				  "in antiphase (on) with the common");
		line(out, "Von/Vop (rms, on)", "%.3f", r->von);
		line(out, "Voff/Vop (rms, off)", "%.3f", r->voff);
		line(out, "selection ratio Von/Voff", "infinite");
		return;
	}
	line(out, "commons N", "%ld (duty 1/%ld)%s", r->commons, r->commons,
	     report->duty_from_spec ? ", from 'duty'" : "");
	line(out, "bias", "%s (%s)", bias,
	     r->bias_by_rule ? "the whole-number bias with the highest "
			       "selection ratio" :
			       "given");
	line(out, "Von/Vop (rms, on)", "%.3f", r->von);
	line(out, "Voff/Vop (rms, off)", "%.3f", r->voff);
	line(out, "selection ratio Von/Voff", "%.3f", r->ratio);
	line(out, "Alt-Pleshko optimum",
	     "ratio %.3f at bias 1/(sqrt N + 1) = %s", r->ratio_max, best);
}

static void window_text(char *text, size_t size,
			const struct gp_drive_window *w)
{
	if (w->empty)
		snprintf(text, size, "empty");
	else if (isinf(w->high))
		snprintf(text, size, "from %.3f V", w->low);
	else
		snprintf(text, size, "%.3f to %.3f V", w->low, w->high);
}

/* The whole-number biases against the Alt-Pleshko optimum. */
static void format_biases(const struct gp_drive_report *report,
			  struct gp_buffer *out)
{
	const struct gp_drive_result *r = &report->result;
	if (r->is_static)
		return;
	gp_buffer_printf(out,
			 "\nWhole-number biases for duty 1/%ld (the rule: the "
			 "highest Von/Voff, on a tie the smaller a)\n",
			 r->commons);
	gp_buffer_puts(out, "  bias    Von/Vop  Voff/Vop  Von/Voff  "
			    "of optimum");
	if (r->has_window)
		gp_buffer_printf(out, "  Vop window at %g \u00b0C",
				 report->params.t_ref);
	gp_buffer_puts(out, "\n");
	for (size_t i = 0; i < r->bias_rows; i++) {
		const struct gp_drive_bias_row *row = &r->biases[i];
		char bias[32], window[64] = "", text[160];
		snprintf(bias, sizeof(bias), "1/%ld", row->a);
		if (r->has_window)
			window_text(window, sizeof(window), &row->window);
		snprintf(text, sizeof(text),
			 "  %-6s %8.3f  %8.3f  %8.3f  %9.1f%%  %-*s%s", bias,
			 row->von, row->voff, row->ratio, 100.0 * row->share,
			 r->has_window ? 18 : 0, window,
			 i == r->chosen_row ? "  chosen" : "");
		/* no trailing blanks where the last columns are empty */
		size_t length = strlen(text);
		while (length && text[length - 1] == ' ')
			text[--length] = '\0';
		gp_buffer_printf(out, "%s\n", text);
	}
}

static void format_window(const struct gp_drive_report *report,
			  struct gp_buffer *out)
{
	const struct gp_drive_result *r = &report->result;
	const struct gp_drive_params *p = &report->params;
	gp_buffer_puts(out, "\nFluid\n");
	if (!r->has_window) {
		line(out, "threshold", "not given ('optics: threshold'): no "
				       "Vop window");
		return;
	}
	line(out, "threshold Vth (10%)", "%.3f V rms at %g \u00b0C", p->vth,
	     p->t_ref);
	if (p->vsat > 0.0) {
		line(out, "saturation Vsat (90%)", "%.3f V rms", p->vsat);
		line(out, "needed ratio Vsat/Vth", "%.3f", r->needed);
	} else {
		line(out, "saturation", "not given: single threshold, Voff "
					"is put on Vth");
	}
	gp_buffer_printf(out, "\nOperating voltage Vop at %g \u00b0C\n",
			 p->t_ref);
	if (r->window.empty) {
		char advice[512];
		gp_drive_advice(report, advice, sizeof(advice));
		line(out, "window", "EMPTY");
		gp_buffer_printf(out, "  error: %s\n", advice);
		return;
	}
	if (isinf(r->window.high))
		line(out, "window", "from %.3f V (Von = %s), no upper limit "
				    "from the fluid (static)",
		     r->window.low, p->vsat > 0.0 ? "Vsat" : "Vth");
	else
		line(out, "window", "%.3f V (Von = %s) to %.3f V (Voff = Vth)",
		     r->window.low, p->vsat > 0.0 ? "Vsat" : "Vth",
		     r->window.high);
	line(out, "recommended Vop", "%.3f V (%.1f%% above the low edge%s)",
	     r->window.recommended, 100.0 * r->window.margin,
	     isinf(r->window.high) ? ", " COMMON_PRACTICE :
	     p->vsat > 0.0	   ? ", as far below the high one" :
				     "; Voff = Vth");
	if (r->vop_given)
		line(out, "given Vop", "%.3f V: %s", r->vop,
		     r->vop_in_window ? "inside the window" :
					"OUTSIDE the window");
}

/* "V1 = V3, V2 = V4": the levels that are one tap at this bias */
static void coinciding_text(char *text, size_t size,
			    const struct gp_drive_levels *l)
{
	text[0] = '\0';
	for (size_t i = 0; i < l->count; i++)
		if (l->same_as[i] >= 0)
			append(text, size, "%sV%d = V%zu", text[0] ? ", " : "",
			       l->same_as[i], i);
	if (!text[0])
		snprintf(text, size, "none");
	append(text, size, " (%zu taps)", l->taps);
}

static void format_levels(const struct gp_drive_report *report,
			  struct gp_buffer *out)
{
	static const char *const names[GP_DRIVE_MAX_LEVELS] = {
		"V0 = Vop", "V1 = (a-1)/a", "V2 = (a-2)/a",
		"V3 = 2/a", "V4 = 1/a",	    "V5 = 0",
	};
	static const char *const static_names[2] = { "V0 = Vop", "V1 = 0" };
	const struct gp_drive_result *r = &report->result;
	const struct gp_drive_levels *l = &r->levels;
	char bias[32], title[96];
	gp_drive_bias_text(bias, sizeof(bias), r->commons, r->bias);
	if (r->is_static)
		snprintf(title, sizeof(title), "Drive levels");
	else
		snprintf(title, sizeof(title), "Bias ladder %s", bias);
	if (r->vop > 0.0)
		gp_buffer_printf(out, "\n%s at Vop = %.3f V\n", title, r->vop);
	else
		gp_buffer_printf(out, "\n%s (fractions of Vop)\n", title);
	if (!r->is_static)
		line(out, "usual driver order", "commons use V0 V1 V4 V5, "
						"segments V0 V2 V3 V5");
	for (size_t i = 0; i < l->count; i++) {
		const char *label = r->is_static ? static_names[i] : names[i];
		char same[16] = "";
		if (l->same_as[i] >= 0)
			snprintf(same, sizeof(same), ", = V%d", l->same_as[i]);
		if (r->vop > 0.0)
			line(out, label, "%.3f V (%.4f Vop%s)", l->volts[i],
			     l->fraction[i], same);
		else
			line(out, label, "%.4f Vop%s", l->fraction[i], same);
	}
	if (r->is_static)
		return;
	char text[256];
	coinciding_text(text, sizeof(text), l);
	line(out, "same voltage", "%s", text);
	char chain[256] = "";
	for (size_t i = 0; i + 1 < l->taps; i++) {
		size_t used = strlen(chain);
		if (fabs(l->resistor[i] - 1.0) < 1e-9)
			snprintf(chain + used, sizeof(chain) - used, "%sR",
				 i ? " : " : "");
		else
			snprintf(chain + used, sizeof(chain) - used,
				 "%s%.3gR", i ? " : " : "", l->resistor[i]);
	}
	line(out, "ladder, top to bottom", "%s", chain);
}

static void format_temperature(const struct gp_drive_report *report,
			       struct gp_buffer *out)
{
	const struct gp_drive_result *r = &report->result;
	const struct gp_drive_params *p = &report->params;
	if (!r->has_range || !r->feasible)
		return;
	if (!r->has_temperature) {
		gp_buffer_puts(out, "\nTemperature\n");
		line(out, "coefficient", "not given ('optics: "
					 "temperature_coefficient'): the "
					 "window is known at %g \u00b0C only",
		     p->t_ref);
		return;
	}
	gp_buffer_printf(out,
			 "\nTemperature (threshold coefficient %g %s, from "
			 "%g \u00b0C; Vth and Vsat scale together)\n",
			 p->tc,
			 p->tc_unit == GP_DRIVE_TC_PERCENT ? "%/\u00b0C" :
							     "mV/\u00b0C",
			 p->t_ref);
	const struct gp_drive_temperature *ends[2] = { &r->cold, &r->hot };
	for (int i = 0; i < 2; i++) {
		char label[64];
		snprintf(label, sizeof(label), "at %g \u00b0C", ends[i]->t);
		const struct gp_drive_window *w = &ends[i]->window;
		if (isinf(w->high))
			line(out, label, "from %.3f V, recommended %.3f V",
			     w->low, w->recommended);
		else
			line(out, label,
			     "window %.3f to %.3f V, recommended %.3f V",
			     w->low, w->high, w->recommended);
	}
	if (r->common_empty)
		line(out, "one Vop for the range", "none: Vop must follow "
						   "temperature (compensate "
						   "as above)");
	else if (isinf(r->common_high))
		line(out, "one Vop for the range", "from %.3f V",
		     r->common_low);
	else
		line(out, "one Vop for the range", "%.3f to %.3f V",
		     r->common_low, r->common_high);
}

static void format_timing(const struct gp_drive_report *report,
			  struct gp_buffer *out)
{
	const struct gp_drive_result *r = &report->result;
	if (!r->has_timing)
		return;
	char t1[32], t2[32], t3[32];
	double hz = report->params.frame_rate;
	gp_buffer_printf(out, "\nTiming at %g Hz\n", hz);
	time_text(t1, sizeof(t1), r->frame_period);
	line(out, "frame period", "%s", t1);
	time_text(t1, sizeof(t1), r->row_time);
	line(out, "row time 1/(N f)", "%s", t1);
	time_text(t1, sizeof(t1), r->half_row_time);
	time_text(t2, sizeof(t2), r->cycle_line);
	if (r->is_static) {
		line(out, "static waveform",
		     "square waves reversing every half frame (%s); full AC "
		     "cycle %s (%g Hz)",
		     t1, t2, hz);
		goto warnings;
	}
	line(out, "line-inverted (type A)",
	     "both polarities in every row, reversing each half row (%s); "
	     "full AC cycle %s (%g Hz)",
	     t1, t2, hz);
	time_text(t3, sizeof(t3), r->cycle_frame);
	line(out, "frame-inverted (type B)",
	     "polarity reverses each frame; full AC cycle %s (%g Hz)", t3,
	     hz / 2.0);
warnings:
	if (r->flicker)
		gp_buffer_printf(out,
				 "  warning: below %g Hz the glass may "
				 "flicker (" COMMON_PRACTICE ")\n",
				 GP_DRIVE_FLICKER_HZ);
	if (r->power)
		gp_buffer_printf(out,
				 "  warning: above %g Hz drive power rises "
				 "for no gain (" COMMON_PRACTICE ")\n",
				 GP_DRIVE_POWER_HZ);
}

static const char *choice_text(int value, const char *const *names)
{
	return value > 0 ? names[value - 1] : "(not given)";
}

static const char *const mode_names[] = { "positive", "negative" };
static const char *const type_names[] = { "reflective", "transflective",
					  "transmissive" };
static const char *const viewing_names[] = { "6 o'clock", "12 o'clock" };
static const char *const fluid_names[] = { "TN", "STN", "FSTN", "HTN" };
static const char *const connection_names[] = { "elastomeric", "pins",
						"heat-seal" };

static void range_text(char *text, size_t size,
		       const struct gp_drive_value range[2])
{
	if (range[0].given)
		snprintf(text, size, "%g to %g \u00b0C", range[0].value,
			 range[1].value);
	else
		snprintf(text, size, "(not given)");
}

static void format_order(const struct gp_drive_report *report,
			 struct gp_buffer *out)
{
	const struct gp_drive_spec *s = report->spec;
	const struct gp_drive_result *r = &report->result;
	char text[64];
	gp_buffer_puts(out, "\nOrdering spec\n");
	line(out, "display mode", "%s", choice_text(s->mode, mode_names));
	line(out, "type", "%s", choice_text(s->type, type_names));
	line(out, "viewing direction", "%s",
	     choice_text(s->viewing, viewing_names));
	line(out, "fluid", "%s", choice_text(s->fluid, fluid_names));
	range_text(text, sizeof(text), s->operating);
	line(out, "operating temperature", "%s", text);
	range_text(text, sizeof(text), s->storage);
	line(out, "storage temperature", "%s", text);
	if (s->has_thickness) {
		gp_format_mm_short(text, sizeof(text), s->glass_thickness);
		line(out, "glass thickness", "%s mm", text);
	} else {
		line(out, "glass thickness", "(not given)");
	}
	line(out, "connection", "%s",
	     choice_text(s->connection, connection_names));
	line(out, "polarizer", "%s", s->polarizer ? s->polarizer :
						    "(not given)");
	if (r->is_static)
		line(out, "duty", "static");
	else
		line(out, "duty", "1/%ld", r->commons);
	gp_drive_bias_text(text, sizeof(text), r->commons, r->bias);
	line(out, "bias", "%s", text);
	if (r->vop > 0.0)
		line(out, "Vop", "%.3f V at %g \u00b0C (%s; full ladder span, "
				 "not peak-to-peak)",
		     r->vop, report->params.t_ref,
		     r->vop_given ? "given" : "recommended");
	else
		line(out, "Vop", "(none: %s)",
		     r->has_window ? "the window is empty" :
				     "no threshold given");
	if (s->frame_rate.given)
		line(out, "frame rate", "%g Hz", s->frame_rate.value);
	else
		line(out, "frame rate", "(not given)");
}

void gp_drive_format(const struct gp_drive_report *report,
		     struct gp_buffer *out)
{
	gp_buffer_puts(out, "Drive and optics");
	if (report->part)
		gp_buffer_printf(out, " for %s", report->part);
	if (report->revision)
		gp_buffer_printf(out, " rev %s", report->revision);
	gp_buffer_puts(out, "\n" VOP_MEANING_1 "\n" VOP_MEANING_2 "\n\n");
	format_multiplex(report, out);
	format_biases(report, out);
	format_window(report, out);
	format_levels(report, out);
	format_temperature(report, out);
	format_timing(report, out);
	format_order(report, out);
}

/* --- JSON ------------------------------------------------------------------ */

/* Six significant digits, written the same way every run; infinity is
 * null (static drive has no upper Vop limit and no finite ratio). */
static struct json_object *number(double value)
{
	if (!isfinite(value))
		return NULL;
	char text[32];
	snprintf(text, sizeof(text), "%.6g", value);
	return json_object_new_double_s(value, text);
}

static void put(struct json_object *object, const char *key,
		struct json_object *value)
{
	json_object_object_add(object, key, value);
}

static struct json_object *window_json(const struct gp_drive_window *w)
{
	struct json_object *o = json_object_new_object();
	put(o, "empty", json_object_new_boolean(w->empty));
	if (w->empty)
		return o;
	put(o, "low_v", number(w->low));
	put(o, "high_v", number(w->high));
	put(o, "recommended_v", number(w->recommended));
	put(o, "margin", number(w->margin));
	return o;
}

static struct json_object *biases_json(const struct gp_drive_result *r)
{
	struct json_object *list = json_object_new_array();
	for (size_t i = 0; i < r->bias_rows; i++) {
		const struct gp_drive_bias_row *row = &r->biases[i];
		struct json_object *o = json_object_new_object();
		char text[32];
		snprintf(text, sizeof(text), "1/%ld", row->a);
		put(o, "bias", json_object_new_string(text));
		put(o, "a", json_object_new_int64(row->a));
		put(o, "von_fraction", number(row->von));
		put(o, "voff_fraction", number(row->voff));
		put(o, "selection_ratio", number(row->ratio));
		put(o, "of_alt_pleshko_max", number(row->share));
		put(o, "window",
		    r->has_window ? window_json(&row->window) : NULL);
		put(o, "chosen", json_object_new_boolean(i == r->chosen_row));
		json_object_array_add(list, o);
	}
	return list;
}

static struct json_object *multiplex_json(const struct gp_drive_report *rep)
{
	const struct gp_drive_result *r = &rep->result;
	struct json_object *o = json_object_new_object();
	char text[32];
	put(o, "commons", json_object_new_int64(r->commons));
	put(o, "static", json_object_new_boolean(r->is_static));
	gp_drive_bias_text(text, sizeof(text), r->commons, r->bias);
	put(o, "bias", json_object_new_string(text));
	put(o, "bias_a", r->is_static ? NULL : number(r->bias));
	put(o, "von_fraction", number(r->von));
	put(o, "voff_fraction", number(r->voff));
	put(o, "selection_ratio", number(r->ratio));
	put(o, "alt_pleshko_max", number(r->ratio_max));
	put(o, "alt_pleshko_bias_a", r->is_static ? NULL : number(r->best_bias));
	put(o, "bias_chosen_by",
	    r->is_static     ? NULL :
	    r->bias_by_rule ? json_object_new_string("highest-ratio") :
			      json_object_new_string("given"));
	if (!r->is_static)
		put(o, "whole_biases", biases_json(r));
	return o;
}

static struct json_object *levels_json(const struct gp_drive_result *r)
{
	struct json_object *list = json_object_new_array();
	for (size_t i = 0; i < r->levels.count; i++) {
		struct json_object *o = json_object_new_object();
		char name[32];
		snprintf(name, sizeof(name), "V%zu", i);
		put(o, "name", json_object_new_string(name));
		put(o, "fraction", number(r->levels.fraction[i]));
		put(o, "volts", r->vop > 0.0 ? number(r->levels.volts[i]) : NULL);
		if (r->levels.same_as[i] >= 0) {
			snprintf(name, sizeof(name), "V%d", r->levels.same_as[i]);
			put(o, "same_as", json_object_new_string(name));
		} else {
			put(o, "same_as", NULL);
		}
		json_object_array_add(list, o);
	}
	return list;
}

/* resistors between the ladder's taps, top to bottom, in units of Vop/a */
static struct json_object *ladder_json(const struct gp_drive_result *r)
{
	if (r->is_static)
		return NULL;
	struct json_object *list = json_object_new_array();
	for (size_t i = 0; i + 1 < r->levels.taps; i++)
		json_object_array_add(list, number(r->levels.resistor[i]));
	return list;
}

static struct json_object *temperature_json(const struct gp_drive_report *rep)
{
	const struct gp_drive_result *r = &rep->result;
	if (!r->has_temperature || !r->feasible)
		return NULL;
	struct json_object *o = json_object_new_object();
	put(o, "coefficient", number(rep->params.tc));
	put(o, "coefficient_unit",
	    json_object_new_string(rep->params.tc_unit == GP_DRIVE_TC_PERCENT ?
					   "%/C" :
					   "mV/C"));
	put(o, "reference_c", number(rep->params.t_ref));
	const struct gp_drive_temperature *ends[2] = { &r->cold, &r->hot };
	const char *names[2] = { "cold", "hot" };
	for (int i = 0; i < 2; i++) {
		struct json_object *end = window_json(&ends[i]->window);
		put(end, "temperature_c", number(ends[i]->t));
		put(end, "factor", number(ends[i]->factor));
		put(o, names[i], end);
	}
	struct json_object *common = json_object_new_object();
	put(common, "empty", json_object_new_boolean(r->common_empty));
	if (!r->common_empty) {
		put(common, "low_v", number(r->common_low));
		put(common, "high_v", number(r->common_high));
	}
	put(o, "one_vop_for_range", common);
	return o;
}

static struct json_object *timing_json(const struct gp_drive_report *rep)
{
	const struct gp_drive_result *r = &rep->result;
	if (!r->has_timing)
		return NULL;
	struct json_object *o = json_object_new_object();
	put(o, "frame_rate_hz", number(rep->params.frame_rate));
	put(o, "frame_period_s", number(r->frame_period));
	put(o, "row_time_s", number(r->row_time));
	put(o, "line_inverted_half_row_s", number(r->half_row_time));
	put(o, "line_inverted_cycle_s", number(r->cycle_line));
	put(o, "frame_inverted_cycle_s", number(r->cycle_frame));
	put(o, "flicker_warning", json_object_new_boolean(r->flicker));
	put(o, "power_warning", json_object_new_boolean(r->power));
	return o;
}

static struct json_object *choice_json(int value, const char *const *names)
{
	return value > 0 ? json_object_new_string(names[value - 1]) : NULL;
}

static struct json_object *range_json(const struct gp_drive_value range[2])
{
	if (!range[0].given)
		return NULL;
	struct json_object *list = json_object_new_array();
	json_object_array_add(list, number(range[0].value));
	json_object_array_add(list, number(range[1].value));
	return list;
}

static struct json_object *order_json(const struct gp_drive_report *rep)
{
	const struct gp_drive_spec *s = rep->spec;
	const struct gp_drive_result *r = &rep->result;
	struct json_object *o = json_object_new_object();
	char text[64];
	put(o, "display_mode", choice_json(s->mode, mode_names));
	put(o, "type", choice_json(s->type, type_names));
	put(o, "viewing_direction", choice_json(s->viewing, viewing_names));
	put(o, "fluid", choice_json(s->fluid, fluid_names));
	put(o, "operating_temperature_c", range_json(s->operating));
	put(o, "storage_temperature_c", range_json(s->storage));
	if (s->has_thickness) {
		gp_format_mm_short(text, sizeof(text), s->glass_thickness);
		put(o, "glass_thickness_mm",
		    json_object_new_double_s(gp_mm(s->glass_thickness), text));
	} else {
		put(o, "glass_thickness_mm", NULL);
	}
	put(o, "connection", choice_json(s->connection, connection_names));
	put(o, "polarizer",
	    s->polarizer ? json_object_new_string(s->polarizer) : NULL);
	if (r->is_static)
		snprintf(text, sizeof(text), "static");
	else
		snprintf(text, sizeof(text), "1/%ld", r->commons);
	put(o, "duty", json_object_new_string(text));
	gp_drive_bias_text(text, sizeof(text), r->commons, r->bias);
	put(o, "bias", json_object_new_string(text));
	put(o, "vop_v", r->vop > 0.0 ? number(r->vop) : NULL);
	put(o, "frame_rate_hz",
	    s->frame_rate.given ? number(s->frame_rate.value) : NULL);
	return o;
}

void *gp_drive_json(const struct gp_drive_report *report)
{
	const struct gp_drive_result *r = &report->result;
	struct json_object *o = json_object_new_object();
	if (!o)
		return NULL;
	put(o, "vop_meaning",
	    json_object_new_string(VOP_MEANING_1 " " VOP_MEANING_2));
	put(o, "multiplex", multiplex_json(report));
	if (r->has_window) {
		struct json_object *fluid = json_object_new_object();
		put(fluid, "threshold_v", number(report->params.vth));
		put(fluid, "saturation_v", report->params.vsat > 0.0 ?
						   number(report->params.vsat) :
						   NULL);
		put(fluid, "needed_ratio",
		    r->needed > 0.0 ? number(r->needed) : NULL);
		put(fluid, "reference_c", number(report->params.t_ref));
		put(o, "fluid", fluid);
		put(o, "window", window_json(&r->window));
	}
	put(o, "feasible", json_object_new_boolean(r->feasible));
	if (!r->feasible) {
		char advice[512];
		gp_drive_advice(report, advice, sizeof(advice));
		put(o, "advice", json_object_new_string(advice));
		put(o, "max_commons_best_bias",
		    json_object_new_int64(r->max_commons));
		put(o, "max_commons_whole_bias",
		    json_object_new_int64(r->max_commons_whole));
	}
	put(o, "vop_v", r->vop > 0.0 ? number(r->vop) : NULL);
	put(o, "vop_given", json_object_new_boolean(r->vop_given));
	put(o, "levels", levels_json(r));
	put(o, "ladder_resistors", ladder_json(r));
	put(o, "temperature", temperature_json(report));
	put(o, "timing", timing_json(report));
	put(o, "order", order_json(report));
	return o;
}

void gp_drive_format_json(const struct gp_drive_report *report,
			  struct gp_buffer *out)
{
	struct json_object *o = gp_drive_json(report);
	if (!o) {
		out->failed = true;
		return;
	}
	gp_buffer_puts(out, json_object_to_json_string_ext(
				    o, JSON_C_TO_STRING_PRETTY |
					       JSON_C_TO_STRING_SPACED |
					       JSON_C_TO_STRING_NOSLASHESCAPE));
	gp_buffer_puts(out, "\n");
	json_object_put(o);
}
