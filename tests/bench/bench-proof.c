/* Benchmark of the PDF proof alone: the 320 x 240-dot glass of
 * bench-build (times a scale factor), routed to two ledges, built once;
 * then gp_proof_write is timed.  Prints the time, the PDF's size and the
 * growth of peak memory while writing it.
 * usage: bench-proof [SCALE] [OUT.pdf] */
#include "bench-glass.h"
#include "build.h"
#include "model.h"
#include "proof.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>

/* Processor time of this process: the machine may be shared, and the
 * goal (under 1 s) is the proof's own work. */
static double cpu_now(void)
{
	struct timespec t;
	clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &t);
	return (double)t.tv_sec + (double)t.tv_nsec / 1e9;
}

int main(int argc, char **argv)
{
	double scale = argc > 1 ? atof(argv[1]) : 1.0;
	long pixels;
	char *text = bench_describe(scale, true, &pixels);
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load_buffer(
		"bench-proof.yaml", text, strlen(text), NULL, 0, &diag);
	struct gp_build *build = design ? gp_build_create(design, &diag) : NULL;
	bool ok = build != NULL;
	if (ok) {
		double before = bench_peak_mb();
		struct gp_buffer out;
		gp_buffer_init(&out);
		double start = bench_now(), cpu_start = cpu_now();
		ok = gp_proof_write(&out, build, &diag);
		double seconds = bench_now() - start;
		double cpu = cpu_now() - cpu_start;
		struct gp_proof_plan plan;
		gp_proof_plan(build, &plan);
		printf("scale %.2f: %ld pixels, %zu pins, %d sheets on %s "
		       "%s at %d:%d: %.3f s (%.3f s of processor time), %.2f MB, "
		       "peak memory +%.1f MB "
		       "(%.1f MB)\n",
		       scale, pixels, build->pin_count, plan.sheet_count,
		       plan.paper_name, plan.landscape ? "landscape"
						       : "portrait",
		       plan.scale_num, plan.scale_den, seconds, cpu,
		       (double)out.size / 1e6, bench_peak_mb() - before, bench_peak_mb());
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
