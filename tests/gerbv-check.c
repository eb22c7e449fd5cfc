/* gerbv-check: render a Gerber file with gerbv and compare its dark area
 * and extent with the expected ones (see gerbv-render.h).  For end-to-end
 * tests:
 *
 *   gerbv-check [--gerbv PATH] [--dpi N] [--area MM2 --perimeter MM]
 *               [--extent X0,Y0,X1,Y1] [--window X0,Y0,X1,Y1]
 *               [--png OUT.png] [--expect-mismatch] FILE.gbr
 *
 * The window rendered is --window X0,Y0,X1,Y1 (mm, glass frame) or else
 * the expected extent, widened by a few pixels.  --area needs --perimeter
 * (the total boundary length, mm) for its tolerance of one pixel along the
 * whole boundary.  --expect-mismatch inverts the verdict for tests that
 * show the check can fail: exit 0 only when gerbv read the file without a
 * complaint and the area or extent disagree.  Prints the measured values
 * on stdout.  Exit 0 when gerbv raised no complaint and everything agrees,
 * 1 when not, 2 on usage errors or when gerbv cannot be run. */
#include "gerbv-render.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static void usage(FILE *to)
{
	fputs("usage: gerbv-check [--gerbv PATH] [--dpi N] "
	      "[--area MM2 --perimeter MM] [--expect-mismatch]\n"
	      "                   [--extent X0,Y0,X1,Y1] "
	      "[--window X0,Y0,X1,Y1] [--png OUT.png] FILE.gbr\n",
	      to);
}

static bool parse_box(const char *text, double box[4])
{
	char tail;
	return sscanf(text, "%lf,%lf,%lf,%lf%c", &box[0], &box[1], &box[2],
		      &box[3], &tail) == 4 &&
	       box[0] < box[2] && box[1] < box[3];
}

static bool parse_number(const char *text, double *value)
{
	char *end;
	*value = strtod(text, &end);
	return end != text && *end == '\0';
}

struct options {
	const char *gerbv, *png, *file;
	double dpi;
	double window[4];
	bool have_window;
	bool expect_mismatch;
	struct gerbv_expect expect;
};

static bool parse(int argc, char **argv, struct options *o)
{
	o->dpi = 1000;
	o->expect.area_mm2 = -1;
	for (int i = 1; i < argc; i++) {
		const char *a = argv[i];
		const char *v = i + 1 < argc ? argv[i + 1] : NULL;
		bool ok = v != NULL;
		if (strcmp(a, "--gerbv") == 0 && v)
			o->gerbv = v;
		else if (strcmp(a, "--expect-mismatch") == 0) {
			o->expect_mismatch = true;
			continue;
		} else if (strcmp(a, "--png") == 0 && v)
			o->png = v;
		else if (strcmp(a, "--dpi") == 0 && v)
			ok = parse_number(v, &o->dpi) && o->dpi > 0;
		else if (strcmp(a, "--area") == 0 && v)
			ok = parse_number(v, &o->expect.area_mm2);
		else if (strcmp(a, "--perimeter") == 0 && v)
			ok = parse_number(v, &o->expect.perimeter_mm);
		else if (strcmp(a, "--extent") == 0 && v) {
			double b[4];
			ok = parse_box(v, b);
			o->expect.x0 = b[0];
			o->expect.y0 = b[1];
			o->expect.x1 = b[2];
			o->expect.y1 = b[3];
			o->expect.check_extent = true;
		} else if (strcmp(a, "--window") == 0 && v) {
			ok = parse_box(v, o->window);
			o->have_window = true;
		} else if (a[0] != '-' && !o->file) {
			o->file = a;
			continue;
		} else
			ok = false;
		if (!ok)
			return false;
		i++;
	}
	return o->file && (o->have_window || o->expect.check_extent);
}

int main(int argc, char **argv)
{
	struct options o = { 0 };
	if (!parse(argc, argv, &o)) {
		usage(stderr);
		return 2;
	}
	struct gerbv_frame frame = { .dpi = o.dpi, .margin_px = 8 };
	if (o.have_window) {
		frame.x0 = o.window[0];
		frame.y0 = o.window[1];
		frame.x1 = o.window[2];
		frame.y1 = o.window[3];
	} else {
		frame.x0 = o.expect.x0;
		frame.y0 = o.expect.y0;
		frame.x1 = o.expect.x1;
		frame.y1 = o.expect.y1;
	}
	char png[4200], err[512];
	if (o.png)
		snprintf(png, sizeof(png), "%s", o.png);
	else
		snprintf(png, sizeof(png), "%s.png", o.file);
	struct gerbv_result r;
	if (!gerbv_render(o.gerbv, o.file, png, &frame, &r, err, sizeof(err))) {
		fprintf(stderr, "gerbv-check: %s: %s\n", o.file, err);
		return 2;
	}
	printf("%s: %dx%d pixels at %g dpi, dark area %.6f mm2, extent "
	       "%.4f,%.4f..%.4f,%.4f mm, %d %%TF%% notes\n",
	       o.file, r.width, r.height, o.dpi, r.area_mm2, r.x0, r.y0, r.x1,
	       r.y1, r.known_notes);
	char why[4096];
	bool ok = gerbv_compare(&r, &o.expect, why, sizeof(why));
	if (!ok)
		fprintf(stderr, "gerbv-check: %s: %s\n", o.file, why);
	if (o.expect_mismatch) {
		/* a clean reading that disagrees: proves the check can fail */
		ok = !ok && r.complaints[0] == '\0';
		if (!ok)
			fprintf(stderr, "gerbv-check: %s: expected a clean "
				"reading that disagrees\n", o.file);
	}
	gerbv_result_finish(&r);
	return ok ? 0 : 1;
}
