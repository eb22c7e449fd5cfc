/* Benchmark: a generated dot-matrix glass of 320 x 240 dots (times a
 * scale factor), built end to end: load, layout, routing (segments to a
 * ledge below the front plate, commons to a ledge right of the back
 * plate: 560 nets at scale 1), write.  Prints wall time,
 * time per pixel and peak memory.  usage: bench-build [SCALE] (0.25, 1, 4) */
#include "glassplot.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>
#include <unistd.h>

static double now(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)t.tv_sec + (double)t.tv_nsec / 1e9;
}

/* 5 x 8 dot cells; scale multiplies the pixel count. */
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
		 " pad_length: 2, carries: segments}\n"
		 "  commons: {side: right, pitch: 0.7, pad_width: 0.35,"
		 " pad_length: 2, carries: commons}\n"
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
	char folder[] = "/tmp/glassplot-bench-XXXXXX";
	if (!mkdtemp(folder))
		return 1;
	double start = now();
	struct gp_diag *diag = gp_diag_create();
	struct gp_design *design = gp_design_load_buffer(
		"bench.yaml", text, strlen(text), NULL, 0, diag);
	double loaded = now();
	struct gp_build *build = design ? gp_build_create(design, diag) : NULL;
	double built = now();
	bool ok = build && gp_build_write(build, folder, diag);
	double seconds = now() - start;
	if (getenv("BENCH_STAGES"))
		printf("load %.3f s, layout and routing %.3f s, writing %.3f s\n",
		       loaded - start, built - loaded, now() - built);
	if (getenv("BENCH_SUMMARY") && build)
		fputs(gp_build_summary(build), stdout);
	for (size_t i = 0; i < gp_diag_count(diag); i++)
		fprintf(stderr, "%s\n", gp_diag_message(diag, i));
	struct rusage usage;
	getrusage(RUSAGE_SELF, &usage);
	/* CPU time too: wall time suffers when the machine is busy */
	double cpu = (double)usage.ru_utime.tv_sec +
		     (double)usage.ru_utime.tv_usec / 1e6 +
		     (double)usage.ru_stime.tv_sec +
		     (double)usage.ru_stime.tv_usec / 1e6;
	printf("scale %.2f: %ld pixels, %.3f s, %.2f us/pixel, peak %.1f MB, "
	       "cpu %.3f s (whole process)\n",
	       scale, pixels, seconds, seconds * 1e6 / (double)pixels,
	       (double)usage.ru_maxrss / 1024.0, cpu);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_destroy(diag);
	free(text);
	char command[128];
	snprintf(command, sizeof(command), "rm -rf %s", folder);
	if (system(command) != 0)
		ok = false;
	return ok ? 0 : 1;
}
