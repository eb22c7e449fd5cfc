/* A preview of real content: the glass as lit when the firmware drives
 * the (common, segment) pairs its map gives for digits, text and icons.
 *
 * The content ("--show SPEC") is a list of items separated by ';':
 *   ROW=DIGITS   a digit row: 0-9, A-F and a few letters, '-' and ' ';
 *                '.' lights the point of the digit before it and ':' its
 *                colon; right-aligned; a row's sign unit takes a leading
 *                '-' or '1' (or "-1") the digits do not
 *   BLOCK=TEXT   a dot-matrix block: one character a cell, left-aligned,
 *                '|' starts the next line; each character rasterised
 *                from Liberation Mono by FreeType into the cell's dots
 *   ICON         an icon, by its name
 * Every pixel whose pair is driven shows lit, whoever owns it. */
#ifndef GP_PREVIEW_H
#define GP_PREVIEW_H

#include "stage.h"
#include "buffer.h"
#include "diag.h"

#include <stdbool.h>

struct gp_show {
	char *spec;
	/* driven pairs, net indices, sorted */
	struct gp_show_pair {
		int common, segment;
	} *pairs;
	size_t pair_count;
	bool *lit;                /* per artwork pixel */
	size_t pixel_count;
};

/* Parses spec against the build; NULL with errors in diag. */
struct gp_show *gp_show_create(const struct gp_build *build, const char *spec,
			       struct gp_diag *diag);
void gp_show_destroy(struct gp_show *show);

/* Appends a PNG of the glass as lit by show at dpi (the glass's extent,
 * x right, y up as the viewer sees it). */
bool gp_show_png(const struct gp_build *build, const struct gp_show *show,
		 double dpi, struct gp_buffer *out, struct gp_diag *diag);

#endif
