#include "tool.h"

#include <getopt.h>
#include <stdlib.h>
#include <string.h>

static const char usage[] =
	"usage: glassplot diff OLD [NEW] [--set KEY=VALUE ...] [--pdf FILE]\n"
	"\n"
	"Compares two revisions of a glass, per layer and per net: what was\n"
	"added, removed, moved (with the shift in mm) or reshaped (with the\n"
	"area change).  With one description, NEW is OLD with the --set\n"
	"overrides applied; with two, the overrides apply to NEW.\n"
	"Exit status: 0 identical, 1 different, 2 bad input or usage.\n"
	"\n"
	"      --set KEY=VALUE  change one value of NEW (repeatable)\n"
	"      --pdf FILE       also draw the changed areas on a PDF page\n"
	"  -q, --quiet          print nothing, only set the exit status\n"
	"  -h, --help           this text\n";

struct diff_options {
	const char *old_path, *new_path, *pdf;
	const char **overrides;
	size_t override_count;
	bool quiet;
};

static int parse(int argc, char **argv, struct diff_options *o)
{
	static const struct option longs[] = {
		{ "set", required_argument, NULL, 's' },
		{ "pdf", required_argument, NULL, 'p' },
		{ "quiet", no_argument, NULL, 'q' },
		{ "help", no_argument, NULL, 'h' },
		{ NULL, 0, NULL, 0 },
	};
	opterr = 0;
	optind = 1;
	int c;
	while ((c = getopt_long(argc, argv, "qh", longs, NULL)) != -1) {
		switch (c) {
		case 's': {
			const char **list = realloc(
				o->overrides,
				(o->override_count + 1) * sizeof(*list));
			if (!list)
				return tool_usage_error("out of memory");
			o->overrides = list;
			list[o->override_count++] = optarg;
			break;
		}
		case 'p': o->pdf = optarg; break;
		case 'q': o->quiet = true; break;
		case 'h': fputs(usage, stdout); return EXIT_OK;
		default:
			return tool_usage_error("diff: unknown option '%s'; "
						"see 'glassplot diff --help'",
						argv[optind - 1]);
		}
	}
	int left = argc - optind;
	if (left < 1 || left > 2)
		return tool_usage_error("diff: expected OLD [NEW]; see "
					"'glassplot diff --help'");
	o->old_path = argv[optind];
	o->new_path = left == 2 ? argv[optind + 1] : argv[optind];
	return -1;
}

static struct gp_build *load_build(const char *path, const char **overrides,
				   size_t count, struct gp_design **design,
				   struct gp_diag *diag)
{
	*design = gp_design_load(path, overrides, count, diag);
	return *design ? gp_build_create(*design, diag) : NULL;
}

int cmd_diff(int argc, char **argv)
{
	struct diff_options o = { 0 };
	int status = parse(argc, argv, &o);
	if (status >= 0) {
		free(o.overrides);
		return status;
	}
	status = EXIT_BAD_INPUT;
	struct gp_diag *diag = gp_diag_create();
	struct gp_design *old_design = NULL, *new_design = NULL;
	struct gp_build *old_build =
		load_build(o.old_path, NULL, 0, &old_design, diag);
	struct gp_build *new_build =
		old_build ? load_build(o.new_path, o.overrides,
				       o.override_count, &new_design, diag)
			  : NULL;
	struct gp_diff *diff =
		new_build ? gp_diff_create(old_build, new_build, diag) : NULL;
	if (diff && (!o.pdf || gp_diff_write_pdf(diff, o.pdf, diag))) {
		if (!o.quiet)
			tool_put(gp_diff_text(diff), stdout);
		status = gp_diff_identical(diff) ? EXIT_OK : EXIT_FINDINGS;
	}
	tool_print_diag(diag, o.quiet ? -1 : 0);
	gp_diff_destroy(diff);
	gp_build_destroy(new_build);
	gp_build_destroy(old_build);
	gp_design_destroy(new_design);
	gp_design_destroy(old_design);
	gp_diag_destroy(diag);
	free(o.overrides);
	return status;
}
