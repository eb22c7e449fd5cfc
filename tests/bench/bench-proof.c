/* Benchmark of the PDF proof alone: the 320 x 240-dot glass of
 * bench-build (times a scale factor), routed to two ledges, built once;
 * then gp_proof_write is timed.  Prints the time, the PDF's size and the
 * growth of peak memory while writing it.
 * usage: bench-proof [SCALE] [OUT.pdf] */
#include "build.h"
#include "model.h"
#include "proof.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>

static double now(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)t.tv_sec + (double)t.tv_nsec / 1e9;
}

static double peak_mb(void)
{
	struct rusage usage;
	getrusage(RUSAGE_SELF, &usage);
	return (double)usage.ru_maxrss / 1024.0;
}

/* The description of bench-build.c, copied: 5 x 8 dot cells; scale
 * multiplies the pixel count; segments to a ledge at the bottom, commons to
 * one on the right. */
static char *describe(double scale, long *pixels)
{
	long cells = lround(64 * sqrt(scale)), lines = lround(30 * sqrt(scale));
	*pixels = cells * lines * 40;
	double width = cells * 3.2 + 20, height = lines * 5.6 + 20;
	char *text = malloc(4096);
	snprintf(text, 4096,
		 "glass: {part: BENCH-%ld}\n"
		 "front: {size: [%.1f, %.1f]}\n"
		 "back: {size: [%.1f, %.1f], position: [0, 5]}\n"
		 "viewing_area: {position: [5, 10], size: [%.1f, %.1f]}\n"
		 "blocks:\n"
		 "  matrix:\n"
		 "    origin: [10, %.1f]\n"
		 "    cells: [%ld, %ld]\n"
		 "    dots: [5, 8]\n"
		 "    dot_size: [0.5, 0.55]\n"
		 "    dot_pitch: [0.55, 0.6]\n"
		 "    cell_pitch: 3.2\n"
		 "    line_pitch: 5.6\n"
		 "ledges:\n"
		 "  segments: {side: bottom, pitch: 0.64, pad_width: 0.32,"
		 " pad_length: 2, edge_clearance: 0.3, carries: segments}\n"
		 "  commons: {side: right, pitch: 0.7, pad_width: 0.35,"
		 " pad_length: 2, edge_clearance: 0.3, carries: commons}\n"
		 "seal: {width: 1, distance: 0.5}\n",
		 *pixels, width, height + 5, width + 6, height, width - 10,
		 height - 10, height, cells, lines);
	return text;
}

int main(int argc, char **argv)
{
	double scale = argc > 1 ? atof(argv[1]) : 1.0;
	long pixels;
	char *text = describe(scale, &pixels);
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load_buffer(
		"bench-proof.yaml", text, strlen(text), NULL, 0, &diag);
	struct gp_build *build = design ? gp_build_create(design, &diag) : NULL;
	bool ok = build != NULL;
	if (ok) {
		double before = peak_mb();
		struct gp_buffer out;
		gp_buffer_init(&out);
		double start = now();
		ok = gp_proof_write(&out, build, &diag);
		double seconds = now() - start;
		struct gp_proof_plan plan;
		gp_proof_plan(build, &plan);
		printf("scale %.2f: %ld pixels, %zu pins, %d sheets on %s "
		       "%s at %d:%d: %.3f s, %.2f MB, peak memory +%.1f MB "
		       "(%.1f MB)\n",
		       scale, pixels, build->pin_count, plan.sheet_count,
		       plan.paper_name, plan.landscape ? "landscape"
						       : "portrait",
		       plan.scale_num, plan.scale_den, seconds,
		       (double)out.size / 1e6, peak_mb() - before, peak_mb());
		if (ok && argc > 2) {
			FILE *file = fopen(argv[2], "wb");
			ok = file && fwrite(out.data, 1, out.size, file) ==
					     out.size;
			if (file)
				fclose(file);
		}
		gp_buffer_finish(&out);
	}
	for (size_t i = 0; i < diag.count; i++)
		fprintf(stderr, "%s\n", diag.entries[i].message);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_finish(&diag);
	free(text);
	return ok ? 0 : 1;
}
