/* celltext.c - the text cells of a catalog (id, note): well-formed UTF-8, and
 * no control characters in an id. Shared by both readers. */
#include <stdio.h>

#include "catalog/catalog.h"

/* Length of the UTF-8 sequence that starts at s (at most n bytes left) and
 * its code point, or 0 when it is not well formed: a stray continuation
 * byte, a cut sequence, an overlong form, a surrogate or a value past
 * U+10FFFF (RFC 3629, section 4). */
static size_t utf8_decode(const unsigned char *s, size_t n, unsigned long *cp)
{
    unsigned char c = s[0];
    size_t len;
    unsigned long v, min;
    if (c < 0x80) {
        *cp = c;
        return 1;
    } else if (c >= 0xC2 && c <= 0xDF) {
        len = 2, v = c & 0x1Fu, min = 0x80;
    } else if (c >= 0xE0 && c <= 0xEF) {
        len = 3, v = c & 0x0Fu, min = 0x800;
    } else if (c >= 0xF0 && c <= 0xF4) {
        len = 4, v = c & 0x07u, min = 0x10000;
    } else {
        return 0;
    }
    if (len > n)
        return 0;
    for (size_t i = 1; i < len; i++) {
        if ((s[i] & 0xC0) != 0x80)
            return 0;
        v = (v << 6) | (s[i] & 0x3Fu);
    }
    if (v < min || v > 0x10FFFF || (v >= 0xD800 && v <= 0xDFFF))
        return 0;
    *cp = v;
    return len;
}

int ps_catalog_text_check(const char *s, size_t len, bool is_id, size_t *at, char *why, size_t cap)
{
    const unsigned char *u = (const unsigned char *)s;
    size_t chars = 0;
    for (size_t i = 0; i < len;) {
        unsigned long cp;
        size_t k = utf8_decode(u + i, len - i, &cp);
        chars++;
        if (k == 0) {
            *at = chars;
            snprintf(why, cap, "not valid UTF-8 (byte 0x%02X at character %zu)", (unsigned)u[i], chars);
            return -1;
        }
        if (is_id && (cp < 0x20 || (cp >= 0x7F && cp <= 0x9F))) {
            *at = chars;
            snprintf(why, cap, "control character U+%04lX at character %zu (refused: an id is printed "
                               "on terminals and in every report)", cp, chars);
            return -1;
        }
        i += k;
    }
    return 0;
}
