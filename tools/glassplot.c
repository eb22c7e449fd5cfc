/* glassplot: the command-line front of the library. */
#include "tool.h"

#include <string.h>

/* "glassplot help messages": the registry of message codes. */
static int print_messages(void)
{
	const char *meaning;
	for (size_t i = 0; gp_message_code_at(i, &meaning); i++)
		printf("%-22s %s\n", gp_message_code_at(i, NULL), meaning);
	return EXIT_OK;
}

/* "glassplot help [COMMAND | messages]" */
static int help(int argc, char **argv)
{
	if (argc > 3)
		return tool_usage_error("help: expected at most one COMMAND; "
					"see 'glassplot --help'");
	if (argc == 3 && strcmp(argv[2], "messages") == 0)
		return print_messages();
	const struct tool_command *command =
		argc == 3 ? tool_find_command(argv[2]) : NULL;
	if (argc == 3 && !command)
		return tool_usage_error("help: unknown command '%s'; see "
					"'glassplot --help'", argv[2]);
	tool_print_help(command, stdout);
	return EXIT_OK;
}

int main(int argc, char **argv)
{
	if (argc < 2)
		return tool_usage_error("expected a command; see 'glassplot "
					"--help'");
	const char *first = argv[1];
	if (strcmp(first, "help") == 0)
		return help(argc, argv);
	if (strcmp(first, "--help") == 0 || strcmp(first, "-h") == 0 ||
	    strcmp(first, "--version") == 0) {
		if (argc > 2)
			return tool_usage_error("unexpected argument '%s' after "
						"'%s'", argv[2], first);
		if (first[2] == 'v')
			printf("glassplot %s\n", gp_version());
		else
			tool_print_help(NULL, stdout);
		return EXIT_OK;
	}
	const struct tool_command *command = tool_find_command(first);
	if (!command)
		return tool_usage_error(first[0] == '-'
						? "unknown option '%s'; see "
						  "'glassplot --help'"
						: "unknown command '%s'; see "
						  "'glassplot --help'",
					first);
	return tool_run(command, argc - 1, argv + 1);
}
