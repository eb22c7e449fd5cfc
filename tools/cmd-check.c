#include "tool.h"

static const char usage[] =
	"usage: glassplot check DESCRIPTION [options]\n"
	"\n"
	"Lays out the glass described in DESCRIPTION and runs every\n"
	"design-rule and electrical check on it without writing files: a\n"
	"line per finding (rule, nets, place in mm, measured value and limit),\n"
	"the limits used and what could not be checked yet.  'glassplot build'\n"
	"runs the same checks and writes them to report.txt and report.json.\n"
	"\n"
	"      --json           print the report as JSON (as report.json)\n"
	"      --strict         warnings count as errors for the exit status\n"
	"      --set KEY=VALUE  change one value of the description, e.g.\n"
	"                       --set rules.min_space=0.02 (repeatable)\n"
	"  -q, --quiet          print errors only\n"
	"  -v, --verbose        print notes too\n"
	"  -h, --help           this text\n"
	"\n"
	"Exit status: 0 no errors, 1 errors (or warnings with --strict) that\n"
	"block manufacture, 2 bad input or usage.\n";

static int run(const struct tool_options *options, struct gp_diag *diag)
{
	struct gp_design *design = tool_load(options, diag);
	struct gp_build *build = design ? gp_build_create(design, diag) : NULL;
	int status = EXIT_BAD_INPUT;
	if (build) {
		status = gp_build_check_status(build, options->strict)
				 ? EXIT_FINDINGS
				 : EXIT_OK;
		if (options->json)
			fputs(gp_build_check_json(build), stdout);
		else if (options->verbosity >= 0 || status != EXIT_OK)
			tool_put(gp_build_check_text(build), stdout);
	}
	if (design)
		tool_print_diag(diag, options->verbosity);
	gp_build_destroy(build);
	gp_design_destroy(design);
	return status;
}

int cmd_check(int argc, char **argv)
{
	return tool_main(argc, argv, usage, false, run);
}
