#include "fuzz-common.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define SET_PREFIX "#set "

bool fuzz_input_init(struct fuzz_input *input, const uint8_t *data,
		     size_t size)
{
	memset(input, 0, sizeof(*input));
	input->body = (const char *)data;
	input->body_size = size;
	const char *p = input->body, *end = p + size;
	size_t prefix = strlen(SET_PREFIX);
	while (input->override_count < FUZZ_MAX_OVERRIDES &&
	       (size_t)(end - p) > prefix &&
	       memcmp(p, SET_PREFIX, prefix) == 0) {
		const char *start = p + prefix;
		const char *newline = memchr(start, '\n', (size_t)(end - start));
		const char *stop = newline ? newline : end;
		char *text = strndup(start, (size_t)(stop - start));
		if (!text)
			return false;
		input->overrides[input->override_count++] = text;
		p = newline ? newline + 1 : end;
	}
	return true;
}

void fuzz_input_finish(struct fuzz_input *input)
{
	for (size_t i = 0; i < input->override_count; i++)
		free(input->overrides[i]);
	input->override_count = 0;
}

static void finding(const char *what, const char *detail)
{
	fprintf(stderr, "fuzz finding: %s: '%s'\n", what, detail);
	abort();
}

void fuzz_check_diag(const struct gp_diag *diag, bool succeeded)
{
	if (diag->lost)
		return; /* out of memory while recording: counts are low */
	if (succeeded && diag->errors > 0)
		finding("success with errors recorded",
			diag->entries[0].message);
	if (!succeeded && diag->errors == 0)
		finding("failure without an error message", "");
	for (size_t i = 0; i < diag->count; i++) {
		const char *m = diag->entries[i].message;
		if (!m[0] || strchr(m, '\n') || strchr(m, '\r'))
			finding("message is not one non-empty line", m);
	}
}

void fuzz_check_output_name(const char *name)
{
	if (!name[0] || name[0] == '.' || strstr(name, ".."))
		finding("output name could leave the folder", name);
	for (const unsigned char *p = (const unsigned char *)name; *p; p++)
		if (*p < 0x20 || *p == 0x7f || *p == '/' || *p == '\\')
			finding("output name is not plain", name);
}
