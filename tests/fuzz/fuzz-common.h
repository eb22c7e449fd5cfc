/* Shared by the fuzz harnesses: how an input is split into command-line
 * overrides and a description, and the checks that hold for every input
 * whatever the outcome (the oracles beyond "no crash, no leak").
 *
 * Input format: leading lines "#set KEY.PATH=VALUE" are overrides (as
 * given with --set); the whole input, those lines included (they are YAML
 * comments), is the description.  So every sample and broken description
 * is a valid seed as it is. */
#ifndef GP_FUZZ_COMMON_H
#define GP_FUZZ_COMMON_H

#include "diag.h"

#include <stddef.h>
#include <stdint.h>

#define FUZZ_MAX_OVERRIDES 8

struct fuzz_input {
	const char *body;
	size_t body_size;
	char *overrides[FUZZ_MAX_OVERRIDES];
	size_t override_count;
};

/* Fills input from data; false when out of memory. */
bool fuzz_input_init(struct fuzz_input *input, const uint8_t *data,
		     size_t size);
void fuzz_input_finish(struct fuzz_input *input);

/* Aborts (a finding) unless diag agrees with the outcome: a failure has at
 * least one error, a success none, every message is one non-empty line. */
void fuzz_check_diag(const struct gp_diag *diag, bool succeeded);
/* Aborts unless name is a plain file name that stays in the folder. */
void fuzz_check_output_name(const char *name);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

#endif
