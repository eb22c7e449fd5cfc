/* Multiplex drive of a passive LCD: RMS voltages, selection ratio, the
 * operating-voltage window, temperature, timing, and the ordering spec.
 *
 * Conventions, stated once here and repeated in every report:
 * - Vop is the full drive amplitude, the span of the bias ladder from its
 *   top level V0 to its bottom level (0 V).  It is NOT a peak-to-peak value:
 *   a line-inverted pixel sees up to +Vop and -Vop, 2 Vop peak-to-peak.
 * - Duty 1/N: N commons scanned once per frame, one row time each.  N = 1
 *   is static drive (no bias ladder, segments in or out of phase with the
 *   one common).
 * - Bias 1/a: a non-selected pixel sees +-Vop/a.  a is a real number >= 2
 *   (drivers usually offer whole numbers; the Alt-Pleshko best is
 *   a = sqrt(N) + 1, whole only when N is a square).
 * - Fluid voltages are RMS volts at the reference temperature: threshold
 *   Vth at 10% contrast, saturation Vsat at 90%.
 * - Temperature coefficient: of the threshold voltage, given either in
 *   %/degC (relative) or in mV/degC (absolute, at the reference
 *   temperature).  Both Vth and Vsat are scaled by the same factor
 *   f(T) = Vth(T) / Vth(Tref), i.e. the fluid keeps its steepness
 *   Vsat/Vth over temperature (an approximation, from memory: good to a few
 *   per cent for TN/STN mixtures over their nematic range).
 *
 * Everything here is pure arithmetic on plain values: nothing prints,
 * nothing allocates. */
#ifndef GP_DRIVE_H
#define GP_DRIVE_H

#include "buffer.h"
#include "diag.h"
#include "drive-spec.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

struct gp_design;
struct gp_node;

/* --- the multiplex formulas --------------------------------------------- */

/* Von and Voff as fractions of Vop for N commons and bias 1/a (N >= 2,
 * a > 0); for N == 1 the static values 1 and 0 (a is ignored). */
void gp_drive_fractions(long commons, double a, double *von, double *voff);
/* Von / Voff; INFINITY for static drive. */
double gp_drive_ratio(long commons, double a);
/* Alt-Pleshko maximum selection ratio sqrt((sqrt N + 1)/(sqrt N - 1));
 * INFINITY for N == 1. */
double gp_drive_ratio_max(long commons);
/* The bias a (of 1/a) that reaches it: sqrt(N) + 1 (2 for N == 1). */
double gp_drive_best_bias(long commons);
/* The bias rule: the whole-number a in 2..N+1 with the highest selection
 * ratio, which gives the widest relative Vop window for any fluid; on a
 * tie the smaller a (fewer ladder levels, lower Vop): 1/2 at N = 2, where
 * 1/2 and 1/3 both give sqrt 5. */
long gp_drive_best_whole_bias(long commons);
/* Largest N whose ratio with the best bias still reaches ratio; 1 (static)
 * when no multiplex does; GP_DRIVE_MAX_COMMONS for ratios <= 1. */
long gp_drive_max_commons(double ratio);
/* Largest N >= 2 that reaches ratio with bias 1/a held fixed (and for
 * which 1/a is a valid bias, N >= a - 1); 0 if none. */
long gp_drive_max_commons_at_bias(double ratio, double a);
/* Largest N >= 2 that reaches ratio with its best whole-number bias
 * (stored in *bias); 0 if none. */
long gp_drive_max_commons_whole(double ratio, long *bias);
/* Range [*low, *high] of bias a within 2..N+1 that reaches ratio at N
 * commons; false when no bias does. */
bool gp_drive_bias_range(long commons, double ratio, double *low,
			 double *high);

/* --- the bias ladder ---------------------------------------------------- */

/* The six levels of a 1/a-bias waveform in the usual driver order, as
 * fractions of Vop: V0 = 1, V1 = (a-1)/a, V2 = (a-2)/a, V3 = 2/a,
 * V4 = 1/a, V5 = 0.  Commons use V0, V1, V4, V5 (selected V0 or V5,
 * non-selected V4 or V1 by polarity); segments use V0, V2, V3, V5.  At
 * 1/2 bias V1 = V4, V2 = V5 and V3 = V0; at 1/3 bias V1 = V3 and V2 = V4;
 * at 1/4 bias V2 = V3.  Static drive has two levels, V0 = Vop and
 * V1 = 0 V. */
#define GP_DRIVE_MAX_LEVELS 6
struct gp_drive_levels {
	size_t count;                          /* 6; 2 for static drive */
	double fraction[GP_DRIVE_MAX_LEVELS];  /* of Vop */
	double volts[GP_DRIVE_MAX_LEVELS];
	/* the lowest-numbered level with the same voltage, or -1 */
	int same_as[GP_DRIVE_MAX_LEVELS];
	/* the distinct voltages, top to bottom: the ladder's taps */
	size_t taps;
	double tap[GP_DRIVE_MAX_LEVELS];       /* fractions of Vop */
	/* resistor between tap i and i+1, in units of the step Vop/a
	 * (so 1/3 bias is 1:1:1, 1/9 bias is 1:1:5:1:1) */
	double resistor[GP_DRIVE_MAX_LEVELS - 1];
};
void gp_drive_levels(long commons, double a, double vop,
		     struct gp_drive_levels *levels);

/* --- the whole calculation ---------------------------------------------- */

/* Inputs, all plain numbers, already checked by the reader. */
struct gp_drive_params {
	long commons;             /* N >= 1 */
	double bias;              /* a of 1/a; 0 = chosen by the rule */
	double vth;               /* V rms at 10% contrast; 0 = not known */
	double vsat;              /* V rms at 90% contrast; 0 = not known */
	enum gp_drive_tc_unit tc_unit;
	double tc;                /* in tc_unit */
	double t_ref;             /* degC where vth/vsat hold */
	bool has_range;
	double t_min, t_max;      /* operating range, degC */
	double frame_rate;        /* Hz; 0 = not given */
	double vop;               /* fixed Vop to check; 0 = none */
};

/* Vop window: Voff <= Vth needs Vop <= high; Von >= Vsat needs Vop >= low.
 * With a single threshold, low is where Von reaches Vth. */
struct gp_drive_window {
	double low, high;         /* V; high is INFINITY for static drive */
	bool empty;               /* low > high */
	double recommended;       /* V; 0 when empty */
	double margin;            /* recommended/low - 1 (relative headroom) */
};

/* The whole-number biases a driver can give, listed for N commons: from
 * 1/2 (or GP_DRIVE_BIAS_ROWS before the end) up to one past the
 * Alt-Pleshko optimum 1/(sqrt N + 1), never below 1/(N+1); a given bias
 * outside that span is listed too.  gp_drive_bias_span gives the span. */
#define GP_DRIVE_BIAS_ROWS 8
struct gp_drive_bias_row {
	long a;                   /* bias 1/a */
	double von, voff;         /* fractions of Vop */
	double ratio;             /* Von/Voff */
	double share;             /* ratio / Alt-Pleshko maximum */
	struct gp_drive_window window;  /* at t_ref, when the fluid is known */
};
void gp_drive_bias_span(long commons, long *low, long *high);

struct gp_drive_temperature {
	double t;                 /* degC */
	double factor;            /* Vth(T)/Vth(Tref) */
	struct gp_drive_window window;
};

struct gp_drive_result {
	long commons;
	bool is_static;
	double bias;              /* a actually used */
	bool bias_by_rule;        /* chosen by the rule, not given */
	double von, voff;         /* fractions of Vop */
	double ratio;             /* Von/Voff */
	double ratio_max;         /* Alt-Pleshko maximum for N */
	double best_bias;         /* a reaching it */
	long best_whole_bias;
	double best_whole_ratio;
	/* the whole-number biases (none for static drive) and which of
	 * them is used (bias_rows when the bias is not a whole number) */
	size_t bias_rows;
	struct gp_drive_bias_row biases[GP_DRIVE_BIAS_ROWS + 1];
	size_t chosen_row;
	double needed;            /* Vsat/Vth; 0 with a single threshold */

	bool has_window;                   /* the fluid is known */
	struct gp_drive_window window;     /* at t_ref */
	bool feasible;                     /* window not empty (or unknown) */
	/* when infeasible: what would work (0 = nothing) */
	long max_commons;                  /* with the best bias */
	long max_commons_at_bias;          /* with the chosen bias */
	long max_commons_whole;            /* with a whole-number bias */
	long max_commons_whole_bias;       /* ... this one */
	bool bias_fix;                     /* some bias works at this N */
	double bias_low, bias_high;        /* range of a that works */

	double vop;                        /* fixed if given, else recommended */
	bool vop_given;
	bool vop_in_window;
	struct gp_drive_levels levels;     /* at vop */

	bool has_range;                    /* cold/hot are filled */
	bool has_temperature;              /* ... and a coefficient given */
	struct gp_drive_temperature cold, hot;
	/* one fixed Vop serving the whole range (window intersection) */
	double common_low, common_high;
	bool common_empty;
	bool vop_in_window_cold, vop_in_window_hot;
	bool factor_invalid;               /* coefficient reaches 0 in range */

	bool has_timing;
	double frame_period;               /* s */
	double row_time;                   /* s: 1/(N f) */
	double half_row_time;              /* s: polarity step, line inversion */
	double cycle_line;                 /* s: waveform period, line inverted */
	double cycle_frame;                /* s: waveform period, frame inverted */
	bool flicker;                      /* below 60 Hz */
	bool power;                        /* above 150 Hz */
};

/* Temperature factor f(T) = Vth(T)/Vth(Tref) for the given params. */
double gp_drive_factor(const struct gp_drive_params *params, double t);

/* The whole calculation.  params must be valid (see the reader); returns
 * false only if they are not (N < 1, a outside 2..N+1, vsat <= vth, ...). */
bool gp_drive_compute(const struct gp_drive_params *params,
		      struct gp_drive_result *result);

/* Why params are invalid, as a static text, or NULL when they are fine. */
const char *gp_drive_params_problem(const struct gp_drive_params *params);

/* Everything a report needs: the spec as written, the number of commons,
 * and the calculation. */
struct gp_drive_report {
	const struct gp_drive_spec *spec;
	const char *file;               /* description, for messages */
	const char *part, *revision;    /* may be NULL */
	long commons;
	bool duty_from_spec;            /* the design has no commons */
	struct gp_drive_params params;
	struct gp_drive_result result;
};

/* Checks the drive against the number of commons the layout made (the
 * pipeline resolves it once, in build->drive, right after the layout
 * stages; a design alone does not know its commons) and computes it:
 * duty, bias range.  Errors (bad input) at the value's place return
 * false; an empty Vop window is recorded as an error too, but returns
 * true with report->result.feasible false.  Warnings for values out of
 * their usual ranges.  commons < 1 takes N from the spec's duty (a
 * drive-only description).  The caller fills report->part and
 * ->revision. */
bool gp_drive_resolve_spec(const struct gp_drive_spec *spec, long commons,
			   const char *file, struct gp_drive_report *report,
			   struct gp_diag *diag);

/* "1/3" for whole a, "1/4.873" otherwise, "static" for N = 1. */
void gp_drive_bias_text(char *text, size_t size, long commons, double a);
/* One line saying why the window is empty and what would work, for the
 * error message and the report; empty when feasible. */
void gp_drive_advice(const struct gp_drive_report *report, char *text,
		     size_t size);

/* The drive and ordering-spec report as plain text (UTF-8), appended to
 * out.  Used by 'glassplot drive', the report and the proof. */
void gp_drive_format(const struct gp_drive_report *report,
		     struct gp_buffer *out);
/* The same as JSON (json-c), appended to out as one object. */
void gp_drive_format_json(const struct gp_drive_report *report,
			  struct gp_buffer *out);
/* A new json-c object (struct json_object *) to embed in a larger
 * document; the caller puts it.  NULL when out of memory. */
void *gp_drive_json(const struct gp_drive_report *report);

#endif
