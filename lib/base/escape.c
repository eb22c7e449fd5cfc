/* Escaping text for C, CSV, Gerber and the terminal (escape.h). */
#include "escape.h"

#include <stdio.h>
#include <stdlib.h>

size_t gp_utf8_next(const char *s, uint32_t *cp)
{
	const unsigned char *p = (const unsigned char *)s;
	size_t length = p[0] < 0x80			? 1 :
			(p[0] & 0xe0) == 0xc0 ? 2 :
			(p[0] & 0xf0) == 0xe0 ? 3 :
			(p[0] & 0xf8) == 0xf0 ? 4 :
						0;
	static const uint32_t lowest[5] = { 0, 0, 0x80, 0x800, 0x10000 };
	uint32_t value = length == 1 ? p[0] :
			 length ? p[0] & (0x7fu >> length) :
				  0;
	for (size_t i = 1; i < length; i++) {
		if ((p[i] & 0xc0) != 0x80) {
			length = 0;
			break;
		}
		value = value << 6 | (p[i] & 0x3fu);
	}
	if (length == 0 || value < lowest[length] || value > 0x10ffff ||
	    (value >= 0xd800 && value <= 0xdfff)) {
		*cp = p[0];
		return 1;
	}
	*cp = value;
	return length;
}

bool gp_is_control(uint32_t cp)
{
	return cp < 0x20 || (cp >= 0x7f && cp <= 0x9f);
}

bool gp_is_bidi_control(uint32_t cp)
{
	return cp == 0x061c || cp == 0x200e || cp == 0x200f ||
	       (cp >= 0x202a && cp <= 0x202e) || (cp >= 0x2066 && cp <= 0x2069);
}

static void put_u(struct gp_buffer *out, uint32_t cp)
{
	if (cp > 0xffff)
		gp_buffer_printf(out, "\\U%08X", (unsigned)cp);
	else
		gp_buffer_printf(out, "\\u%04X", (unsigned)cp);
}

void gp_escape_c_comment(struct gp_buffer *out, const char *text)
{
	for (const char *p = text; *p;) {
		uint32_t cp;
		size_t n = gp_utf8_next(p, &cp);
		if (cp == '*' && p[1] == '/')
			gp_buffer_puts(out, "*\\");
		else if (cp == '/' && p[1] == '*')
			gp_buffer_puts(out, "/\\");
		else if (cp == '?' && p[1] == '?')
			gp_buffer_puts(out, "?\\");
		else if (cp == '\\')
			gp_buffer_puts(out, "\\\\");
		else if (cp >= 0x20 && cp < 0x7f)
			gp_buffer_append(out, p, 1);
		else
			put_u(out, cp);
		p += n;
	}
}

void gp_escape_c_string(struct gp_buffer *out, const char *text)
{
	for (const unsigned char *p = (const unsigned char *)text; *p; p++) {
		if (*p == '"' || *p == '\\')
			gp_buffer_printf(out, "\\%c", *p);
		else if (*p == '?' && p[1] == '?')
			gp_buffer_puts(out, "?\\");
		else if (*p >= 0x20 && *p < 0x7f)
			gp_buffer_append(out, p, 1);
		else
			gp_buffer_printf(out, "\\%03o", *p);
	}
}

void gp_escape_csv(struct gp_buffer *out, const char *text)
{
	bool quote = text[0] == ' ';
	size_t length = 0;
	for (const char *p = text; *p; p++, length++)
		quote |= *p == ',' || *p == '"' || *p == '\r' || *p == '\n';
	quote |= length > 0 && text[length - 1] == ' ';
	if (!quote) {
		gp_buffer_puts(out, text);
		return;
	}
	gp_buffer_puts(out, "\"");
	for (const char *p = text; *p; p++)
		gp_buffer_puts(out, *p == '"' ? "\"\"" : (char[2]){ *p, 0 });
	gp_buffer_puts(out, "\"");
}

void gp_escape_gerber(struct gp_buffer *out, const char *text)
{
	for (const char *p = text; *p;) {
		uint32_t cp;
		size_t n = gp_utf8_next(p, &cp);
		if (n == 1 && cp >= 0x80)
			cp = 0xfffd;
		if (cp == ',' || cp == '*' || cp == '%' || cp == '\\' ||
		    cp < 0x20 || cp >= 0x7f)
			put_u(out, cp);
		else
			gp_buffer_append(out, p, 1);
		p += n;
	}
}

void gp_escape_terminal(struct gp_buffer *out, const char *text,
			bool keep_lines)
{
	for (const char *p = text; *p;) {
		uint32_t cp;
		size_t n = gp_utf8_next(p, &cp);
		bool line = keep_lines && (cp == '\n' || cp == '\t');
		if (!line && (gp_is_control(cp) || gp_is_bidi_control(cp) ||
			      (n == 1 && cp >= 0x80)))
			gp_buffer_printf(out, "\\u{%04X}", (unsigned)cp);
		else
			gp_buffer_append(out, p, n);
		p += n;
	}
}

GP_EXPORT char *gp_text_for_terminal(const char *text, bool keep_lines)
{
	struct gp_buffer out;
	gp_buffer_init(&out);
	gp_escape_terminal(&out, text, keep_lines);
	gp_buffer_append(&out, "", 1);
	if (out.failed) {
		gp_buffer_finish(&out);
		return NULL;
	}
	return out.data;
}
