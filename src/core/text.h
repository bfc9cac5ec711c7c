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

#endif
