/* Segment digits as the description gives them: the figures, their
 * segment names and parameter check (figure.c), and the 'digits' section
 * (digits-read.c).  The construction and the layout are in digits.h. */
#ifndef GP_DIGITS_SPEC_H
#define GP_DIGITS_SPEC_H

#include "diag.h"
#include "geom.h"
#include "spec.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

enum gp_figure {
	GP_FIGURE_7,
	GP_FIGURE_14,
	GP_FIGURE_16,
};

/* How segments end where they meet. */
enum gp_ends {
	/* Corners mitred along the line from the outer to the inner corner;
	 * ends meeting at a three-way joint pointed. */
	GP_ENDS_BEVELLED,
	/* Square ends: horizontal segments run the full width, vertical
	 * ones stop short of them by the gap. */
	GP_ENDS_SQUARE,
};

enum gp_dot_shape {
	GP_DOT_ROUND,  /* flattened with the chord tolerance, vertices on the
			* circle */
	GP_DOT_SQUARE, /* sheared with the digit, `size` across perpendicular
			* to its sides and `size` high */
};

struct gp_figure_spec {
	enum gp_figure figure;
	int64_t height, width;    /* upright outline */
	int64_t stroke;           /* segment width, perpendicular */
	int64_t gap;              /* between neighbours, perpendicular */
	double slant;             /* degrees; > 0 leans the top to the right */
	enum gp_ends ends;
};

#define GP_FIGURE_MAX_SEGMENTS 16
#define GP_DIGITS_MAX_COUNT 64        /* digits in one row */
#define GP_DIGITS_MAX_ROWS 32
#define GP_DIGITS_MAX_TOTAL 256       /* digits in all rows */
/* Parts of one unit (a digit and what belongs to it): segments, point,
 * colon. */
#define GP_UNIT_MAX_PARTS (GP_FIGURE_MAX_SEGMENTS + 2)

size_t gp_figure_segment_count(enum gp_figure figure);
/* "a".."g", "g1", "a2", ...; NULL when out of range. */
const char *gp_figure_segment_name(enum gp_figure figure, size_t index);
/* Index of name in the figure, or -1. */
int gp_figure_segment_index(enum gp_figure figure, const char *name);

/* Checks the parameters of a figure; errors name `what` and `where`. */
bool gp_figure_check(const struct gp_figure_spec *spec, const char *what,
		     const struct gp_where *where, struct gp_diag *diag);

/* --- the description ------------------------------------------------------ */

/* One (common, line) pair given in an explicit assignment. */
struct gp_digit_pair {
	const char *part;         /* segment name, "dp", "colon", ... */
	int common;               /* 1-based */
	int line;                 /* 1-based segment line within the unit */
	struct gp_where where;
};

/* A row of digits ("digits:" section entry). */
struct gp_digits {
	const char *name;
	struct gp_where where;
	struct gp_point origin;   /* bottom-left of digit 1's upright outline */
	long count;
	int64_t pitch;
	struct gp_figure_spec figure;
	/* decimal points */
	uint64_t point_mask;      /* bit i: digit i+1 has a point */
	enum gp_dot_shape point_shape;
	int64_t point_size;
	int64_t point_gap;        /* clear of the digit's side */
	bool point_placed;        /* point_at given */
	struct gp_point point_at; /* centre relative to the digit's origin */
	/* colons: bit i: a colon between digit i+1 and digit i+2 */
	uint64_t colon_mask;
	enum gp_dot_shape colon_shape;
	int64_t colon_size;
	/* the unit before digit 1: a minus sign and/or a half digit "1" */
	bool minus, one;
	/* drive */
	int duty;                 /* 1 static, 2..4 multiplexed */
	struct gp_digit_pair *pairs; /* explicit assignment, or NULL */
	size_t pair_count;
	struct gp_where drive_where;
};

struct gp_design;
/* Reads the "digits" section (a map of rows by name) into design. */
bool gp_digits_read(struct gp_design *design, const struct gp_node *node,
		    struct gp_diag *diag);
void gp_digits_free(struct gp_digits *rows, size_t count);

#endif
