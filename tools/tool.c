#include "tool.h"

#include <getopt.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

void tool_put(const char *text, FILE *file)
{
	char *safe = gp_text_for_terminal(text, true);
	fputs(safe ? safe : "(out of memory)\n", file);
	free(safe);
}

void tool_print_diag(const struct gp_diag *diag, int verbosity)
{
	for (size_t i = 0; i < gp_diag_count(diag); i++) {
		enum gp_severity severity = gp_diag_severity(diag, i);
		if (severity == GP_SEVERITY_NOTE && verbosity < 1)
			continue;
		if (severity == GP_SEVERITY_WARNING && verbosity < 0)
			continue;
		const char *kind = severity == GP_SEVERITY_ERROR   ? ""
				   : severity == GP_SEVERITY_WARNING ? "warning: "
								     : "note: ";
		char *safe = gp_text_for_terminal(gp_diag_message(diag, i),
						  false);
		fprintf(stderr, "%s%s\n", kind, safe ? safe : "(out of memory)");
		free(safe);
	}
}

int tool_usage_error(const char *format, ...)
{
	va_list args;
	va_start(args, format);
	char text[2048];
	vsnprintf(text, sizeof(text), format, args);
	va_end(args);
	char *safe = gp_text_for_terminal(text, false);
	fprintf(stderr, "glassplot: %s\n", safe ? safe : text);
	free(safe);
	return EXIT_BAD_INPUT;
}

static bool add_override(struct tool_options *options, const char *text)
{
	const char **list = realloc(options->overrides,
				    (options->override_count + 1) *
					    sizeof(*list));
	if (!list)
		return false;
	options->overrides = list;
	list[options->override_count++] = text;
	return true;
}

int tool_parse(int argc, char **argv, struct tool_options *options,
	       const char *usage, bool wants_output)
{
	static const struct option longs[] = {
		{ "output", required_argument, NULL, 'o' },
		{ "set", required_argument, NULL, 's' },
		{ "quiet", no_argument, NULL, 'q' },
		{ "verbose", no_argument, NULL, 'v' },
		{ "strict", no_argument, NULL, 'S' },
		{ "json", no_argument, NULL, 'J' },
		{ "only", required_argument, NULL, 'O' },
		{ "depfile", required_argument, NULL, 'D' },
		{ "help", no_argument, NULL, 'h' },
		{ NULL, 0, NULL, 0 },
	};
	memset(options, 0, sizeof(*options));
	opterr = 0;
	optind = 1;
	int c;
	while ((c = getopt_long(argc, argv, "o:qvh", longs, NULL)) != -1) {
		switch (c) {
		case 'o': options->output = optarg; break;
		case 's':
			if (!add_override(options, optarg))
				return tool_usage_error("out of memory");
			break;
		case 'q': options->verbosity = -1; break;
		case 'v': options->verbosity = 1; break;
		case 'S': options->strict = true; break;
		case 'J': options->json = true; break;
		case 'O': options->only = optarg; break;
		case 'D': options->depfile = optarg; break;
		case 'h':
			fputs(usage, stdout);
			return EXIT_OK;
		default:
			return tool_usage_error("%s: unknown option '%s'; see "
						"'glassplot %s --help'",
						argv[0], argv[optind - 1],
						argv[0]);
		}
	}
	if (optind != argc - 1)
		return tool_usage_error("%s: expected one DESCRIPTION file; "
					"see 'glassplot %s --help'",
					argv[0], argv[0]);
	options->description = argv[optind];
	if (wants_output && !options->output)
		return tool_usage_error("%s: expected -o OUTDIR", argv[0]);
	return -1;
}

void tool_options_finish(struct tool_options *options)
{
	free(options->overrides);
	options->overrides = NULL;
}

int tool_main(int argc, char **argv, const char *usage, bool wants_output,
	      int (*run)(const struct tool_options *options,
			 struct gp_diag *diag))
{
	struct tool_options options;
	int status = tool_parse(argc, argv, &options, usage, wants_output);
	if (status < 0) {
		struct gp_diag *diag = gp_diag_create();
		status = diag ? run(&options, diag) : EXIT_BAD_INPUT;
		gp_diag_destroy(diag);
	}
	tool_options_finish(&options);
	return status;
}

struct gp_design *tool_load(const struct tool_options *options,
			    struct gp_diag *diag)
{
	struct gp_design *design =
		gp_design_load(options->description, options->overrides,
			       options->override_count, diag);
	/* on success the caller prints the messages with its own */
	if (!design)
		tool_print_diag(diag, options->verbosity);
	return design;
}

int tool_source_date_epoch(long long *epoch)
{
	const char *text = getenv("SOURCE_DATE_EPOCH");
	if (!text || !*text)
		return 0;
	char *end;
	long long value = strtoll(text, &end, 10);
	if (*end || value < 0 || value > 253402300799LL) {
		tool_usage_error("SOURCE_DATE_EPOCH='%s' is not a number of "
				 "seconds since 1970 (up to year 9999)", text);
		return -2;
	}
	*epoch = value;
	return 1;
}

void tool_progress(const char *stage, void *data)
{
	static struct timespec start;
	static bool started;
	struct timespec now;
	clock_gettime(CLOCK_MONOTONIC, &now);
	if (!started) {
		start = now;
		started = true;
	}
	double elapsed = (double)(now.tv_sec - start.tv_sec) +
			 (double)(now.tv_nsec - start.tv_nsec) / 1e9;
	const struct tool_options *options = data;
	if (options->verbosity >= 0 && elapsed > 1.0 && isatty(2))
		fprintf(stderr, "glassplot: %s (%.1f s)\n", stage, elapsed);
}
