#include "tool.h"

static const char usage[] =
	"usage: glassplot build DESCRIPTION -o OUTDIR [options]\n"
	"\n"
	"Lays out the glass described in DESCRIPTION and writes its artwork\n"
	"into OUTDIR: one Gerber file per layer.  Nothing is written unless\n"
	"every output is complete.\n"
	"\n"
	"  -o, --output DIR     folder for the outputs (created if missing)\n"
	"      --set KEY=VALUE  change one value of the description, e.g.\n"
	"                       --set blocks.main.cell_pitch=3.6 (repeatable)\n"
	"  -q, --quiet          print errors only\n"
	"  -v, --verbose        print notes too\n"
	"  -h, --help           this text\n";

int cmd_build(int argc, char **argv)
{
	struct tool_options options;
	int status = tool_parse(argc, argv, &options, usage, true);
	if (status >= 0)
		goto out;
	status = EXIT_BAD_INPUT;
	struct gp_diag *diag = gp_diag_create();
	if (!diag)
		goto out;
	struct gp_design *design = tool_load(&options, diag);
	struct gp_build *build = design ? gp_build_create(design, diag) : NULL;
	if (build && gp_build_write(build, options.output, diag)) {
		if (options.verbosity >= 0)
			fputs(gp_build_summary(build), stdout);
		status = EXIT_OK;
	}
	if (design)
		tool_print_diag(diag, options.verbosity);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_destroy(diag);
out:
	tool_options_finish(&options);
	return status;
}
