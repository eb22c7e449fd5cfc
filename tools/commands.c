/* The commands and the options each takes: the one table the parser, the
 * --help texts and the test that keeps the manuals and the completion in
 * step (tests/list-keys.c) read. */
#include "tool.h"

#include <string.h>

#define SET(example)                                                       \
	{ OPTION_SET, 0, "set", "KEY=VALUE", true, false,                  \
	  "change one value of the description, e.g.\n--set " example      \
	  " (repeatable)" }
#define QUIET { OPTION_QUIET, 'q', "quiet", NULL, false, false,            \
		"print errors only" }
#define VERBOSE { OPTION_VERBOSE, 'v', "verbose", NULL, false, false,      \
		  "print notes too, and the time of each stage" }
#define HELP { OPTION_HELP, 'h', "help", NULL, false, false, "this text" }
#define END { OPTION_COUNT, 0, NULL, NULL, false, false, NULL }

static const struct tool_option build_options[] = {
	{ OPTION_OUTPUT, 'o', "output", "DIR", false, true,
	  "folder for the outputs (created if missing)" },
	SET("blocks.main.cell_pitch=3.6"),
	{ OPTION_ONLY, 0, "only", "KINDS", false, false,
	  "write only these outputs: a comma-separated\nlist of gerber, "
	  "proof, pins, firmware, report" },
	{ OPTION_FACES, 0, "faces", "WHICH", false, false,
	  "Gerber files seen from the viewer (NAME.gbr,\nthe default), from "
	  "each plate's coated face\n(NAME-coated.gbr: the front plate's "
	  "mirrored)\nor both: viewer, coated or both" },
	{ OPTION_JSON, 0, "json", NULL, false, false,
	  "print the summary as JSON" },
	{ OPTION_STRICT, 0, "strict", NULL, false, false,
	  "warnings count as errors for the exit status" },
	{ OPTION_DEPFILE, 0, "depfile", "FILE", false, false,
	  "write a make/ninja dependency file" },
	{ OPTION_SHOW, 0, "show", "SPEC", false, false,
	  "add a proof sheet of the glass lit with this\ncontent, e.g. "
	  "--show 'clock=12:34;alarm'" },
	QUIET,
	VERBOSE,
	HELP,
	END,
};

static const struct tool_option preview_options[] = {
	{ OPTION_SHOW, 0, "show", "SPEC", false, true,
	  "the content: ROW=DIGITS, BLOCK=TEXT ('|' between\nlines) and "
	  "icon names, separated by ';'" },
	{ OPTION_OUTPUT, 'o', "output", "FILE.png", false, true,
	  "the PNG to write" },
	{ OPTION_DPI, 0, "dpi", "N", false, false,
	  "dots per inch (default 300)" },
	SET("digits.clock.pitch=9.5"),
	QUIET,
	VERBOSE,
	HELP,
	END,
};

static const struct tool_option check_options[] = {
	{ OPTION_JSON, 0, "json", NULL, false, false,
	  "print the report as JSON (as report.json)" },
	{ OPTION_STRICT, 0, "strict", NULL, false, false,
	  "warnings count as errors for the exit status" },
	SET("rules.min_space=0.02"),
	QUIET,
	VERBOSE,
	HELP,
	END,
};

static const struct tool_option diff_options[] = {
	{ OPTION_SET, 0, "set", "KEY=VALUE", true, false,
	  "change one value of NEW (repeatable)" },
	{ OPTION_PDF, 0, "pdf", "FILE", false, false,
	  "also draw the changed areas on a PDF page" },
	{ OPTION_QUIET, 'q', "quiet", NULL, false, false,
	  "print nothing, only set the exit status" },
	HELP,
	END,
};

static const struct tool_option drive_options[] = {
	{ OPTION_JSON, 0, "json", NULL, false, false,
	  "print JSON instead of text" },
	SET("drive.bias=1/4"),
	QUIET,
	VERBOSE,
	HELP,
	END,
};

const struct tool_command tool_commands[] = {
	{ "build", "write the artwork set for a description",
	  "DESCRIPTION -o OUTDIR [options]",
	  "Lays out the glass described in DESCRIPTION and writes its artwork\n"
	  "into OUTDIR.  Nothing is written unless every output is complete.\n"
	  "Dates come from SOURCE_DATE_EPOCH when it is set; otherwise no\n"
	  "output carries a date.",
	  "DESCRIPTION", 1, 1, build_options,
	  "Exit status: 0 ok, 1 findings that block manufacture, 2 bad input\n"
	  "or usage.",
	  cmd_build },
	{ "check", "run the design-rule and electrical checks",
	  "DESCRIPTION [options]",
	  "Lays out the glass described in DESCRIPTION and runs every\n"
	  "design-rule and electrical check on it without writing files: a\n"
	  "line per finding (rule, nets, place in mm, measured value and\n"
	  "limit), the limits used and what could not be checked yet.\n"
	  "'glassplot build' runs the same checks and writes them to\n"
	  "report.txt and report.json.",
	  "DESCRIPTION", 1, 1, check_options,
	  "Exit status: 0 no errors, 1 errors (or warnings with --strict) "
	  "that\nblock manufacture, 2 bad input or usage.",
	  cmd_check },
	{ "diff", "compare two revisions of a glass",
	  "OLD [NEW] [options]",
	  "Compares two revisions of a glass, per layer and per net: what was\n"
	  "added, removed, moved (with the shift in mm) or reshaped (with the\n"
	  "area change).  With one description, NEW is OLD with the --set\n"
	  "overrides applied; with two, the overrides apply to NEW.",
	  "OLD [NEW]", 1, 2, diff_options,
	  "Exit status: 0 identical, 1 different, 2 bad input or usage.",
	  cmd_diff },
	{ "drive", "print the drive voltages and ordering spec",
	  "DESCRIPTION [options]",
	  "Prints the drive and ordering spec of the glass in DESCRIPTION: "
	  "Von\nand Voff for its duty and bias, the selection ratio against "
	  "the\nAlt-Pleshko limit, the Vop window for the fluid and a "
	  "recommended\nVop, the bias ladder, Vop at the ends of the "
	  "temperature range, frame\ntiming and the ordering fields.  Vop is "
	  "the full drive amplitude (the\nspan of the bias ladder), not a "
	  "peak-to-peak value.",
	  "DESCRIPTION", 1, 1, drive_options,
	  "Exit status: 0 the fluid can be switched, 1 no Vop can switch it "
	  "at\nthis duty, 2 bad input or usage.",
	  cmd_drive },
	{ "preview", "write a PNG of the glass lit with given content",
	  "DESCRIPTION --show SPEC -o FILE.png [options]",
	  "Lays out the glass described in DESCRIPTION and writes a PNG of it\n"
	  "as the viewer sees it lit with the content SPEC: the digits, text\n"
	  "and icons given, through the (common, segment) pairs of the\n"
	  "firmware map, so every pixel at a driven pair shows lit.  Text in\n"
	  "a dot-matrix block is rasterised from Liberation Mono by FreeType,\n"
	  "one character a cell.  'glassplot build --show SPEC' adds the same\n"
	  "as a sheet of the proof.",
	  "DESCRIPTION", 1, 1, preview_options,
	  "Exit status: 0 ok, 2 bad input or usage.",
	  cmd_preview },
};

const size_t tool_command_count =
	sizeof(tool_commands) / sizeof(tool_commands[0]);

const struct tool_command *tool_find_command(const char *name)
{
	for (size_t i = 0; i < tool_command_count; i++)
		if (strcmp(tool_commands[i].name, name) == 0)
			return &tool_commands[i];
	return NULL;
}
