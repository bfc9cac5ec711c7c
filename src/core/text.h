/* text.h - a sentence built piece by piece into a caller's fixed buffer:
 * appends that stop quietly at the end of the room, always NUL-terminated. */
#ifndef PS_TEXT_H
#define PS_TEXT_H

#include <stddef.h>

typedef struct ps_text {
    char *buf;  /* the caller's buffer */
    size_t n;   /* its size in bytes (> 0) */
    size_t len; /* bytes written so far, < n */
} ps_text;

/* A text writing into buf (n > 0 bytes), emptied. */
ps_text ps_text_on(char *buf, size_t n);

/* Append printf-style; what does not fit is cut. */
void ps_text_put(ps_text *t, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* A number that may lie past a double's range, given with its natural
 * logarithm ln (limits/floors.h): "%.*g" with sig significant digits while
 * value is finite; when value is +INFINITY and ln finite, the power of ten
 * from the logarithm in the same e-notation ("1.97e+434"); else "inf" or
 * "nan". Writes into buf (n > 0 bytes, 40 always suffice) and returns it. */
const char *ps_text_big(char *buf, size_t n, double value, double ln, int sig);

/* Append ps_text_big's text. */
void ps_text_put_big(ps_text *t, double value, double ln, int sig);

#endif
