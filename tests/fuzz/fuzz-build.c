/* libFuzzer harness: the whole pipeline on in-memory input — load, lay
 * out, route, check and render every output into memory
 * (gp_build_outputs), touching no file. */
#include "fuzz-common.h"

#include "build.h"

/* Designs larger than these are valid but only slow to lay out (under
 * ASan a few hundred nets or a few dozen digits take seconds); skip them
 * so that fuzzing time goes to logic, not to throughput, and no input
 * comes near the time-out.  The limits themselves are tested in
 * tests/errors, tests/test-limits.c and by the benchmarks. */
#define FUZZ_MAX_DOTS 20000
#define FUZZ_MAX_NETS 400
#define FUZZ_MAX_ICONS 16
#define FUZZ_MAX_DIGITS 16

static bool small_enough(const struct gp_design *design)
{
	if (design->icon_count > FUZZ_MAX_ICONS)
		return false;
	long digits = 0;
	for (size_t i = 0; i < design->digit_count; i++)
		digits += design->digits[i].count;
	if (digits > FUZZ_MAX_DIGITS)
		return false;
	size_t dots = 0, nets = 0;
	for (size_t i = 0; i < design->block_count; i++) {
		const struct gp_block *b = &design->blocks[i];
		dots += (size_t)(b->cells * b->lines) *
			(size_t)(b->dots_across * b->dots_down);
		nets += (size_t)(b->lines * b->dots_down) +
			(size_t)(b->lines * b->cells * b->dots_across);
	}
	return dots <= FUZZ_MAX_DOTS && nets <= FUZZ_MAX_NETS;
}

static void render(struct gp_build *build, struct gp_diag *diag)
{
	struct gp_output_set set;
	gp_output_set_init(&set);
	bool ok = gp_build_outputs(build, &set, diag);
	fuzz_check_diag(diag, ok);
	for (size_t i = 0; i < set.count; i++)
		fuzz_check_output_name(set.files[i].name);
	gp_output_set_finish(&set);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	struct fuzz_input input;
	struct gp_diag diag;
	gp_diag_init(&diag);
	if (!fuzz_input_init(&input, data, size))
		goto out;
	struct gp_design *design = gp_design_load_buffer(
		"fuzz.yaml", input.body, input.body_size,
		(const char *const *)input.overrides, input.override_count,
		&diag);
	fuzz_check_diag(&diag, design != NULL);
	if (design && small_enough(design)) {
		struct gp_build *build = gp_build_create(design, &diag);
		fuzz_check_diag(&diag, build != NULL);
		if (build)
			render(build, &diag);
		gp_build_destroy(build);
	}
	gp_design_destroy(design);
out:
	gp_diag_finish(&diag);
	fuzz_input_finish(&input);
	return 0;
}
