/* Benchmark: a generated dot-matrix glass of 320 x 240 dots (times a
 * scale factor), built end to end: load, layout, routing (segments to a
 * ledge below the front plate, commons to a ledge right of the back
 * plate: 560 nets at scale 1), write.  Prints wall time,
 * time per pixel and peak memory.  usage: bench-build [SCALE] (0.25, 1, 4) */
#include "bench-glass.h"
#include "glassplot.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>
#include <unistd.h>

int main(int argc, char **argv)
{
	double scale = argc > 1 ? atof(argv[1]) : 1.0;
	/* "plain": the dot matrix alone written as Gerber (no routing, no
	 * proof), the foundation's own measure */
	bool plain = argc > 2 && strcmp(argv[2], "plain") == 0;
	long pixels;
	char *text = bench_describe(scale, !plain, &pixels);
	char folder[] = "/tmp/glassplot-bench-XXXXXX";
	if (!mkdtemp(folder))
		return 1;
	double start = bench_now();
	struct gp_diag *diag = gp_diag_create();
	struct gp_design *design = gp_design_load_buffer(
		"bench.yaml", text, strlen(text), NULL, 0, diag);
	double loaded = bench_now();
	struct gp_build *build = design ? gp_build_create(design, diag) : NULL;
	double built = bench_now();
	bool ok = build && (!plain || gp_build_select(build, "gerber", diag)) &&
		  gp_build_write(build, folder, diag);
	double seconds = bench_now() - start;
	if (getenv("BENCH_STAGES"))
		printf("load %.3f s, layout and routing %.3f s, writing %.3f s\n",
		       loaded - start, built - loaded, bench_now() - built);
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
	printf("%s scale %.2f: %ld pixels, %.3f s, %.2f us/pixel, peak %.1f MB, "
	       "cpu %.3f s (whole process)\n",
	       plain ? "plain" : "routed", scale, pixels, seconds, seconds * 1e6 / (double)pixels,
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
