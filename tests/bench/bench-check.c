/* Benchmark of the checks: the 320 x 240-dot glass of bench-build (times
 * a scale factor) laid out, then every check run on its artwork.  Prints
 * the time of the checks alone and per pixel.  usage: bench-check [SCALE] */
#include "bench-glass.h"
#include "build.h"
#include "check.h"
#include "geos.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

int main(int argc, char **argv)
{
	double scale = argc > 1 ? atof(argv[1]) : 1.0;
	long pixels;
	char *text = bench_describe(scale, true, &pixels);
	struct gp_diag *diag = gp_diag_create();
	struct gp_design *design = text ? gp_design_load_buffer(
		"bench.yaml", text, strlen(text), NULL, 0, diag) : NULL;
	struct gp_build *build = design ? gp_build_create(design, diag) : NULL;
	struct gp_geos *geos = gp_geos_create(diag);
	struct gp_check_limits limits;
	struct gp_check_report report;
	gp_check_limits_default(&limits);
	gp_check_report_init(&report);
	bool ok = false;
	double seconds = 0;
	if (build && geos) {
		limits.plate[GP_PLATE_FRONT] = design->front.box;
		limits.plate[GP_PLATE_BACK] = design->back.box;
		limits.viewing = design->viewing;
		limits.row_time = 1.0 / (70.0 * 240); /* 1/240 duty, 70 Hz */
		double start = bench_now();
		ok = gp_check_run(geos, &build->art, &limits, &report, diag);
		seconds = bench_now() - start;
	}
	for (size_t i = 0; i < gp_diag_count(diag); i++)
		fprintf(stderr, "%s\n", gp_diag_message(diag, i));
	printf("checks, scale %.2f: %zu pixels checked of %ld, %.3f s, "
	       "%.2f us/pixel, %zu errors, %zu warnings\n",
	       scale, report.pixels_checked, pixels, seconds,
	       seconds * 1e6 / (double)pixels, report.errors, report.warnings);
	for (size_t i = 0; i < report.count && i < 3; i++)
		printf("  %s: %s\n", gp_check_rule_name(report.findings[i].rule),
		       report.findings[i].text);
	ok = ok && report.pixels_checked == (size_t)pixels;
	gp_check_report_finish(&report);
	gp_geos_destroy(geos);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_destroy(diag);
	free(text);
	return ok ? 0 : 1;
}
