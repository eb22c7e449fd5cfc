#include "tool.h"

#include <stdlib.h>
#include <string.h>

static const char usage[] =
	"usage: glassplot drive DESCRIPTION [options]\n"
	"\n"
	"Prints the drive and ordering spec of the glass in DESCRIPTION: Von\n"
	"and Voff for its duty and bias, the selection ratio against the\n"
	"Alt-Pleshko limit, the Vop window for the fluid and a recommended\n"
	"Vop, the bias ladder, Vop at the ends of the temperature range, frame\n"
	"timing and the ordering fields.  Vop is the full drive amplitude (the\n"
	"span of the bias ladder), not a peak-to-peak value.\n"
	"\n"
	"      --json           print JSON instead of text\n"
	"      --set KEY=VALUE  change one value of the description, e.g.\n"
	"                       --set drive.bias=1/4 (repeatable)\n"
	"  -q, --quiet          print errors only\n"
	"  -v, --verbose        print notes too\n"
	"  -h, --help           this text\n"
	"\n"
	"Exit status: 0 the fluid can be switched, 1 no Vop can switch it at\n"
	"this duty, 2 bad input or usage.\n";

/* Takes --json out of argv (before the common parser sees it). */
static bool take_json(int *argc, char **argv)
{
	bool json = false;
	int kept = 0;
	for (int i = 0; i < *argc; i++) {
		if (strcmp(argv[i], "--") == 0) {
			while (i < *argc)
				argv[kept++] = argv[i++];
			break;
		}
		if (i > 0 && strcmp(argv[i], "--json") == 0)
			json = true;
		else
			argv[kept++] = argv[i];
	}
	*argc = kept;
	argv[kept] = NULL;
	return json;
}

int cmd_drive(int argc, char **argv)
{
	bool json = take_json(&argc, argv);
	struct tool_options options;
	int status = tool_parse(argc, argv, &options, usage, false);
	if (status >= 0)
		goto out;
	status = EXIT_BAD_INPUT;
	struct gp_diag *load_diag = gp_diag_create();
	struct gp_diag *diag = gp_diag_create();
	if (!load_diag || !diag)
		goto done;
	struct gp_design *design = tool_load(&options, load_diag);
	if (!design)
		goto done;
	bool feasible;
	char *text = gp_drive_report_create(
		design, json ? GP_DRIVE_JSON : GP_DRIVE_TEXT, &feasible, diag);
	if (text) {
		if (json)
			fputs(text, stdout);
		else
			tool_put(text, stdout);
		fflush(stdout);
		status = feasible ? EXIT_OK : EXIT_FINDINGS;
	}
	tool_print_diag(load_diag, options.verbosity);
	tool_print_diag(diag, options.verbosity);
	free(text);
	gp_design_destroy(design);
done:
	gp_diag_destroy(diag);
	gp_diag_destroy(load_diag);
out:
	tool_options_finish(&options);
	return status;
}
