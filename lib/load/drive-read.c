/* Reading the 'drive:' and 'optics:' sections; lib/drive/drive-resolve.c
 * resolves them against the design's number of commons. */
#include "drive-spec.h"
#include "model.h"
#include "spec.h"
#include "units.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Largest voltage or frame rate we accept: far above any passive glass,
 * low enough that nothing overflows. */
#define MAX_VOLTS 1000.0
#define MAX_HZ 100000.0
#define MIN_CELSIUS -273.15
#define MAX_CELSIUS 1000.0

/* A plain decimal number filling text[0..length) (gp_parse_decimal);
 * false otherwise. */
static bool parse_number(const char *text, size_t length, double *out)
{
	char copy[64];
	if (length == 0 || length >= sizeof(copy))
		return false;
	memcpy(copy, text, length);
	copy[length] = '\0';
	return gp_parse_decimal(copy, out);
}

static const struct gp_node *scalar(struct gp_reader *r, const char *key)
{
	const struct gp_node *node = gp_read_node(r, key, false);
	if (node && !gp_node_expect_scalar(node, r->diag)) {
		r->ok = false;
		return NULL;
	}
	return node;
}

/* A voltage (or rate): a plain number, not negative, not zero. */
static bool read_positive(struct gp_reader *r, const char *key,
			  const char *what, double max,
			  struct gp_drive_value *out)
{
	const struct gp_node *node = scalar(r, key);
	if (!node)
		return r->ok;
	double value;
	if (node->quoted ||
	    !parse_number(node->text, strlen(node->text), &value)) {
		r->ok = gp_diag_error(r->diag, &node->where,
				      "'%s' must be a number (%s), got '%s'",
				      key, what, node->text);
		return false;
	}
	if (value < 0.0) {
		r->ok = gp_diag_error(r->diag, &node->where,
				      "'%s' cannot be negative (%s), got %s",
				      key, what, node->text);
		return false;
	}
	if (value == 0.0 || value > max) {
		r->ok = gp_diag_error(r->diag, &node->where,
				      "'%s' must be above 0 and at most %g "
				      "(%s), got %s",
				      key, max, what, node->text);
		return false;
	}
	*out = (struct gp_drive_value){ true, node->where, value };
	return true;
}

/* "1/a" with a plain decimal a; returns false when text is not that. */
static bool parse_fraction(const char *text, double *a)
{
	if (strncmp(text, "1/", 2) != 0)
		return false;
	return parse_number(text + 2, strlen(text + 2), a);
}

static bool read_bias(struct gp_reader *r, struct gp_drive_spec *spec)
{
	const struct gp_node *node = scalar(r, "bias");
	if (!node)
		return r->ok;
	double a = 0.0;
	if (strcmp(node->text, "best") == 0) {
		spec->bias = (struct gp_drive_value){ true, node->where, 0.0 };
		return true;
	}
	if (!parse_fraction(node->text, &a)) {
		r->ok = gp_diag_error(r->diag, &node->where,
				      "'bias' must be written 1/a (like 1/3 "
				      "or 1/4) or 'best', got '%s'",
				      node->text);
		return false;
	}
	if (!(a >= 2.0) || a > (double)GP_DRIVE_MAX_COMMONS + 1.0) {
		r->ok = gp_diag_error(r->diag, &node->where,
				      "'bias' %s is outside 1/2 ... 1/(N+1): "
				      "the bias ladder needs a >= 2 in 1/a",
				      node->text);
		return false;
	}
	/* a driver's ladder has whole steps: 1/4.5 is no bias one can
	 * order or drive */
	if (a != floor(a)) {
		r->ok = gp_diag_fail(r->diag, GP_MSG_NOT_WHOLE, &node->where,
				     "'bias' %s is not a bias a driver can "
				     "give: write a whole-number bias such "
				     "as 1/%.0f or 1/%.0f, or 'best' to let "
				     "glassplot choose",
				     node->text, floor(a), ceil(a));
		return false;
	}
	spec->bias = (struct gp_drive_value){ true, node->where, a };
	return true;
}

static bool read_duty(struct gp_reader *r, struct gp_drive_spec *spec)
{
	const struct gp_node *node = scalar(r, "duty");
	if (!node)
		return r->ok;
	const char *text = node->text;
	long n = 0;
	if (strcmp(text, "static") == 0) {
		n = 1;
	} else if (strncmp(text, "1/", 2) == 0 && text[2] >= '0' &&
		   text[2] <= '9') {
		char *end;
		errno = 0;
		n = strtol(text + 2, &end, 10);
		if (*end != '\0' || errno == ERANGE)
			n = -1;
	} else {
		n = -1;
	}
	if (n < 0) {
		r->ok = gp_diag_error(r->diag, &node->where,
				      "'duty' must be written 1/N (like "
				      "1/8) or 'static', got '%s'",
				      text);
		return false;
	}
	if (n < 1 || n > GP_DRIVE_MAX_COMMONS) {
		r->ok = gp_diag_error(r->diag, &node->where,
				      "'duty' %s needs N from 1 to %ld "
				      "commons",
				      text, GP_DRIVE_MAX_COMMONS);
		return false;
	}
	spec->duty = (struct gp_drive_value){ true, node->where, (double)n };
	return true;
}

bool gp_drive_read(struct gp_design *design, const struct gp_node *node,
		   struct gp_diag *diag)
{
	struct gp_drive_spec *spec = &design->drive;
	struct gp_reader r;
	gp_reader_begin(&r, node, "'drive'", diag);
	if (!r.map)
		return gp_reader_end(&r);
	spec->has_drive = true;
	spec->drive_where = node->where;
	read_duty(&r, spec);
	read_bias(&r, spec);
	read_positive(&r, "vop", "volts, the full ladder span", MAX_VOLTS,
		      &spec->vop);
	if (read_positive(&r, "frame_rate", "frames per second, Hz", MAX_HZ,
			  &spec->frame_rate) &&
	    spec->frame_rate.given) {
		double hz = spec->frame_rate.value;
		if (hz < GP_DRIVE_FLICKER_HZ)
			gp_diag_warning(diag, &spec->frame_rate.where,
					"frame rate %g Hz is below %g Hz and "
					"may flicker (common practice, no "
					"published source)",
					hz, GP_DRIVE_FLICKER_HZ);
		else if (hz > GP_DRIVE_POWER_HZ)
			gp_diag_warning(diag, &spec->frame_rate.where,
					"frame rate %g Hz is above %g Hz and "
					"costs power for nothing (common "
					"practice, no published source)",
					hz, GP_DRIVE_POWER_HZ);
	}
	return gp_reader_end(&r);
}

/* "-0.3 %/C", "-8 mV/degC", ... : number, optional spaces, unit. */
static bool read_coefficient(struct gp_reader *r, struct gp_drive_spec *spec)
{
	static const struct {
		const char *unit;
		enum gp_drive_tc_unit kind;
	} units[] = {
		{ "%/C", GP_DRIVE_TC_PERCENT },
		{ "%/\u00b0C", GP_DRIVE_TC_PERCENT },
		{ "%/degC", GP_DRIVE_TC_PERCENT },
		{ "%/K", GP_DRIVE_TC_PERCENT },
		{ "mV/C", GP_DRIVE_TC_MILLIVOLT },
		{ "mV/\u00b0C", GP_DRIVE_TC_MILLIVOLT },
		{ "mV/degC", GP_DRIVE_TC_MILLIVOLT },
		{ "mV/K", GP_DRIVE_TC_MILLIVOLT },
	};
	const struct gp_node *node = scalar(r, "temperature_coefficient");
	if (!node)
		return r->ok;
	const char *text = node->text;
	size_t length = strcspn(text, " %m");
	const char *unit = text + length;
	while (*unit == ' ')
		unit++;
	double value;
	for (size_t i = 0; i < sizeof(units) / sizeof(units[0]); i++) {
		if (strcmp(unit, units[i].unit) != 0 ||
		    !parse_number(text, length, &value))
			continue;
		spec->coefficient =
			(struct gp_drive_value){ true, node->where, value };
		spec->tc_unit = units[i].kind;
		/* nematic thresholds fall as they warm (from memory) */
		if (value > 0.0)
			gp_diag_warning(r->diag, &node->where,
					"a positive temperature coefficient "
					"is unusual: nematic thresholds fall "
					"as they warm");
		return true;
	}
	r->ok = gp_diag_error(r->diag, &node->where,
			      "'temperature_coefficient' must be a number "
			      "with its unit, %%/C (of the threshold) or "
			      "mV/C, like '-0.3 %%/C' or '-8 mV/C'; got '%s'",
			      text);
	return false;
}

static bool read_celsius(const struct gp_node *node, const char *key,
			 struct gp_diag *diag, struct gp_drive_value *out)
{
	double value;
	if (node->kind != GP_NODE_SCALAR || node->quoted ||
	    !parse_number(node->text, strlen(node->text), &value) ||
	    value < MIN_CELSIUS || value > MAX_CELSIUS)
		return gp_diag_error(diag, &node->where,
				     "'%s' needs temperatures in degrees "
				     "Celsius from %g to %g",
				     key, MIN_CELSIUS, MAX_CELSIUS);
	*out = (struct gp_drive_value){ true, node->where, value };
	return true;
}

/* [min, max] in degC, min <= max. */
static bool read_range(struct gp_reader *r, const char *key,
		       struct gp_drive_value out[2], struct gp_where *where)
{
	const struct gp_node *node = gp_read_node(r, key, false);
	if (!node)
		return true;
	if (node->kind != GP_NODE_SEQUENCE || node->count != 2) {
		r->ok = gp_diag_error(r->diag, &node->where,
				      "'%s' must be [lowest, highest] in "
				      "degrees Celsius, like [-20, 70]",
				      key);
		return false;
	}
	struct gp_drive_value ends[2];
	if (!read_celsius(node->items[0], key, r->diag, &ends[0]) ||
	    !read_celsius(node->items[1], key, r->diag, &ends[1])) {
		r->ok = false;
		return false;
	}
	if (ends[0].value > ends[1].value) {
		r->ok = gp_diag_error(r->diag, &node->where,
				      "'%s' is upside down: %s is above %s; "
				      "write [lowest, highest]",
				      key, node->items[0]->text,
				      node->items[1]->text);
		return false;
	}
	out[0] = ends[0];
	out[1] = ends[1];
	*where = node->where;
	return true;
}

static bool read_choices(struct gp_reader *r, struct gp_drive_spec *spec)
{
	static const char *const modes[] = { "positive", "negative", NULL };
	static const char *const types[] = { "reflective", "transflective",
					     "transmissive", NULL };
	/* plain 6 and 12 are accepted for 6 and 12 o'clock */
	static const char *const views[] = { "6 o'clock", "12 o'clock", "6",
					     "12", NULL };
	static const char *const fluids[] = { "TN", "STN", "FSTN", "HTN",
					      NULL };
	static const char *const connections[] = { "elastomeric", "pins",
						   "heat-seal", NULL };
	int index = -1;
	bool ok = true;
	if ((ok &= gp_read_choice(r, "mode", false, modes, &index)) &&
	    index >= 0)
		spec->mode = (enum gp_display_mode)(index + 1);
	index = -1;
	if ((ok &= gp_read_choice(r, "type", false, types, &index)) &&
	    index >= 0)
		spec->type = (enum gp_display_type)(index + 1);
	index = -1;
	if ((ok &= gp_read_choice(r, "viewing_direction", false, views,
				  &index)) &&
	    index >= 0)
		spec->viewing = (enum gp_viewing)(index % 2 + 1);
	index = -1;
	if ((ok &= gp_read_choice(r, "fluid", false, fluids, &index)) &&
	    index >= 0)
		spec->fluid = (enum gp_fluid)(index + 1);
	index = -1;
	if ((ok &= gp_read_choice(r, "connection", false, connections,
				  &index)) &&
	    index >= 0)
		spec->connection = (enum gp_connection)(index + 1);
	return ok;
}

/* Usual ranges: common practice, no published source. */
#define USUAL_T_LOW -40.0
#define USUAL_T_HIGH 85.0
#define USUAL_THICK_LOW (INT64_C(300000))   /* 0.3 mm */
#define USUAL_THICK_HIGH (INT64_C(1100000)) /* 1.1 mm */
#define USUAL_VTH_LOW 0.5
#define USUAL_VTH_HIGH 10.0

static void warn_usual(const struct gp_drive_spec *spec, struct gp_diag *diag)
{
	const char *cp = "(common practice, no published source)";
	if (spec->operating[0].given &&
	    (spec->operating[0].value < USUAL_T_LOW ||
	     spec->operating[1].value > USUAL_T_HIGH))
		gp_diag_warning(diag, &spec->operating_where,
				"operating temperature %g..%g \u00b0C goes "
				"beyond the usual %g..%g \u00b0C of wide-range "
				"fluids %s",
				spec->operating[0].value,
				spec->operating[1].value, USUAL_T_LOW,
				USUAL_T_HIGH, cp);
	if (spec->operating[0].given && spec->storage[0].given &&
	    (spec->storage[0].value > spec->operating[0].value ||
	     spec->storage[1].value < spec->operating[1].value))
		gp_diag_warning(diag, &spec->storage_where,
				"storage temperature %g..%g \u00b0C does not "
				"cover the operating range %g..%g \u00b0C",
				spec->storage[0].value, spec->storage[1].value,
				spec->operating[0].value,
				spec->operating[1].value);
	if (spec->has_thickness &&
	    (spec->glass_thickness < USUAL_THICK_LOW ||
	     spec->glass_thickness > USUAL_THICK_HIGH))
		gp_diag_warning(diag, &spec->thickness_where,
				"glass thickness %.3f mm is outside the "
				"usual 0.3..1.1 mm %s",
				gp_mm(spec->glass_thickness), cp);
	if (spec->threshold.given &&
	    (spec->threshold.value < USUAL_VTH_LOW ||
	     spec->threshold.value > USUAL_VTH_HIGH))
		gp_diag_warning(diag, &spec->threshold.where,
				"threshold %g V is outside the usual "
				"%g..%g V rms of display fluids %s",
				spec->threshold.value, USUAL_VTH_LOW,
				USUAL_VTH_HIGH, cp);
}

static bool read_thickness(const struct gp_node *node, struct gp_diag *diag,
			   struct gp_drive_spec *spec)
{
	int64_t nm;
	if (!gp_node_length(node, diag, &nm))
		return false;
	if (nm <= 0)
		return gp_diag_error(diag, &node->where,
				     "'glass_thickness' must be above 0 mm, "
				     "got %s",
				     node->text);
	spec->has_thickness = true;
	spec->glass_thickness = nm;
	spec->thickness_where = node->where;
	return true;
}

static bool read_fluid_voltages(struct gp_reader *r,
				struct gp_drive_spec *spec)
{
	bool ok = read_positive(r, "threshold", "volts rms at 10% contrast",
				MAX_VOLTS, &spec->threshold);
	ok &= read_positive(r, "saturation", "volts rms at 90% contrast",
			    MAX_VOLTS, &spec->saturation);
	if (!ok || !spec->saturation.given)
		return ok;
	if (!spec->threshold.given) {
		r->ok = gp_diag_error(r->diag, &spec->saturation.where,
				      "'saturation' needs 'threshold' too "
				      "(the 10%% contrast voltage)");
		return false;
	}
	if (spec->saturation.value <= spec->threshold.value) {
		r->ok = gp_diag_error(r->diag, &spec->saturation.where,
				      "'saturation' %g V must be above "
				      "'threshold' %g V: saturation is the "
				      "90%% contrast voltage, threshold the "
				      "10%% one",
				      spec->saturation.value,
				      spec->threshold.value);
		return false;
	}
	return true;
}

bool gp_optics_read(struct gp_design *design, const struct gp_node *node,
		    struct gp_diag *diag)
{
	struct gp_drive_spec *spec = &design->drive;
	struct gp_reader r;
	gp_reader_begin(&r, node, "'optics'", diag);
	if (!r.map)
		return gp_reader_end(&r);
	spec->has_optics = true;
	spec->optics_where = node->where;
	read_choices(&r, spec);
	read_fluid_voltages(&r, spec);
	read_coefficient(&r, spec);
	const struct gp_node *t = gp_read_node(&r, "reference_temperature",
					       false);
	if (t)
		r.ok &= read_celsius(t, "reference_temperature", diag,
				     &spec->reference_temperature);
	read_range(&r, "operating_temperature", spec->operating,
		   &spec->operating_where);
	read_range(&r, "storage_temperature", spec->storage,
		   &spec->storage_where);
	const struct gp_node *thick = gp_read_node(&r, "glass_thickness",
						   false);
	if (thick)
		r.ok &= read_thickness(thick, diag, spec);
	gp_read_string(&r, "polarizer", false, &spec->polarizer);
	if (r.ok)
		warn_usual(spec, diag);
	return gp_reader_end(&r);
}
