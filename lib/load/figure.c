/* What a segment figure is before it is built: its segment names and the
 * check of its parameters (the construction is in lib/layout/digits.c). */
#include "digits-spec.h"

#include "units.h"

#include <math.h>
#include <string.h>

#define PI 3.14159265358979323846

static const char *const names7[] = { "a", "b", "c", "d", "e", "f", "g" };
static const char *const names14[] = { "a", "b",  "c",  "d", "e",
				       "f", "g1", "g2", "h", "i",
				       "j", "k",  "l",  "m" };
static const char *const names16[] = { "a1", "a2", "b",  "c", "d1", "d2",
				       "e",  "f",  "g1", "g2", "h", "i",
				       "j",  "k",  "l",  "m" };

size_t gp_figure_segment_count(enum gp_figure figure)
{
	switch (figure) {
	case GP_FIGURE_7:
		return 7;
	case GP_FIGURE_14:
		return 14;
	case GP_FIGURE_16:
		return 16;
	}
	return 0;
}

const char *gp_figure_segment_name(enum gp_figure figure, size_t index)
{
	if (index >= gp_figure_segment_count(figure))
		return NULL;
	switch (figure) {
	case GP_FIGURE_7:
		return names7[index];
	case GP_FIGURE_14:
		return names14[index];
	case GP_FIGURE_16:
		return names16[index];
	}
	return NULL;
}

int gp_figure_segment_index(enum gp_figure figure, const char *name)
{
	for (size_t i = 0; i < gp_figure_segment_count(figure); i++)
		if (strcmp(gp_figure_segment_name(figure, i), name) == 0)
			return (int)i;
	return -1;
}

bool gp_figure_check(const struct gp_figure_spec *s, const char *what,
		     const struct gp_where *where, struct gp_diag *diag)
{
	char a[32], b[32];
	if (s->slant < -30 || s->slant > 30)
		return gp_diag_fail(diag, GP_MSG_OUT_OF_RANGE, where,
				    "%s: slant %g degrees is out of range "
				    "(expected -30 to 30)",
				    what, s->slant);
	double sec = 1 / cos(s->slant * PI / 180.0);
	/* across: two upright strokes and a middle bar at least a stroke
	 * long with a gap each side; 14 and 16 segments: three uprights and
	 * two counters that each hold a diagonal stroke (with room for its
	 * clipped ends, half a stroke) and its gaps */
	double sv = (double)s->stroke * sec, g = (double)s->gap;
	double st = (double)s->stroke;
	double need_w = s->figure == GP_FIGURE_7 ? 2 * sv + 2 * g + st
						 : 3 * sv + 2 * (1.5 * st + 2 * g);
	if ((double)s->width < need_w) {
		gp_format_mm_short(a, sizeof(a), s->width);
		gp_format_mm_short(b, sizeof(b), (int64_t)ceil(need_w));
		return gp_diag_fail(diag, GP_MSG_TOO_SMALL, where,
				    "%s: width %s mm leaves no room for the "
				    "middle segment; expected at least %s "
				    "mm for this stroke, gap and slant",
				    what, a, b);
	}
	/* down: three bars and two uprights at least a stroke long; a
	 * diagonal needs half as much again */
	int64_t need_h = (s->figure == GP_FIGURE_7 ? 5 : 6) * s->stroke +
			 4 * s->gap;
	if (s->height < need_h) {
		gp_format_mm_short(a, sizeof(a), s->height);
		gp_format_mm_short(b, sizeof(b), need_h);
		return gp_diag_fail(diag, GP_MSG_TOO_SMALL, where,
				    "%s: height %s mm is too small for the "
				    "stroke and gap; expected at least %s mm",
				    what, a, b);
	}
	return true;
}
