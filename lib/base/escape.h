/* Escaping text for the format it goes into, so that data never becomes
 * code or markup: a name in a description is written into a C header, a
 * CSV file, a Gerber comment or attribute, and onto a terminal.  Every
 * writer that puts a user's text into a file goes through one of these.
 *
 * Input is UTF-8 (the description loader accepts nothing else and refuses
 * control characters, spec.c); bytes that are not valid UTF-8 are treated
 * as single code points 0x80..0xFF and escaped like controls.  Each
 * function appends to out (sticky failure, buffer.h). */
#ifndef GP_ESCAPE_H
#define GP_ESCAPE_H

#include "buffer.h"
#include "glassplot.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

/* Decodes one code point at s (s[0] != 0) into *cp; returns the bytes it
 * took (1 for a byte that starts no valid sequence, *cp = that byte). */
size_t gp_utf8_next(const char *s, uint32_t *cp);

/* Unicode Cc: C0, DEL and C1. */
bool gp_is_control(uint32_t cp);
/* The bidirectional formatting characters (Unicode Bidi_Control: LRM, RLM,
 * ALM, LRE..RLO, LRI..PDI), which reorder what a reader sees. */
bool gp_is_bidi_control(uint32_t cp);

/* Text inside a C block comment: printable ASCII as it is, except that
 * "*" before "/" and "/" before "*" are split by a backslash ("*\/",
 * "/\*"), "??" becomes "?\?" (no trigraph), "\" is doubled; every other
 * code point is written as \uXXXX or \UXXXXXXXX text.  The comment stays
 * ASCII, closes only where the writer closes it, and passes -Wcomment,
 * -Wtrigraphs and -Wbidi-chars. */
void gp_escape_c_comment(struct gp_buffer *out, const char *text);

/* The inside of a C string literal (without the quotes): printable ASCII
 * as it is but '"' and '\' escaped and "??" as "?\?"; every other byte as
 * a three-digit octal escape, so the literal holds the same UTF-8 bytes
 * and the header stays ASCII (ISO C11 6.4.4.4, 6.4.5). */
void gp_escape_c_string(struct gp_buffer *out, const char *text);

/* One CSV field as RFC 4180 (section 2, rules 5-7) writes it: in double
 * quotes, with each '"' doubled, when it holds a comma, a quote, CR or LF
 * or starts or ends with a space; as it is otherwise. */
void gp_escape_csv(struct gp_buffer *out, const char *text);

/* A Gerber string (Gerber Layer Format Specification, sections 3.1 and
 * 3.4.3): printable ASCII as it is but the reserved '%' and '*', the
 * field separator ',' and the escape character '\'; those and every other
 * character as \uXXXX (\UXXXXXXXX beyond 16 bits), a byte that is not
 * UTF-8 as U+FFFD.  The same rule as the Gerber writer's. */
void gp_escape_gerber(struct gp_buffer *out, const char *text);

/* Text for a terminal: controls (escape sequences start with one), bidi
 * controls and bytes that are not UTF-8 become visible "\u{XXXX}" text;
 * newlines and tabs are kept when keep_lines. */
void gp_escape_terminal(struct gp_buffer *out, const char *text,
			bool keep_lines);

#endif
