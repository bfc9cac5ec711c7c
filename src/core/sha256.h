/* sha256.h - SHA-256 (FIPS 180-4) of a byte stream or a file, for the
 * provenance line of the reports: which input bytes a run read. */
#ifndef PS_SHA256_H
#define PS_SHA256_H

#include <stddef.h>
#include <stdint.h>

typedef struct ps_sha256 {
    uint32_t h[8];
    uint64_t bytes;             /* message length so far */
    unsigned char block[64];
    size_t fill;                /* bytes waiting in block */
} ps_sha256;

void ps_sha256_init(ps_sha256 *c);
void ps_sha256_add(ps_sha256 *c, const void *data, size_t n);
/* The digest as 64 lowercase hex digits and a NUL (hex: 65 bytes). */
void ps_sha256_hex(ps_sha256 *c, char hex[65]);

/* Digest of the file at path, and its size. 0 on success; -1 with errno set
 * when it cannot be opened or read. */
int ps_sha256_file(const char *path, char hex[65], uint64_t *bytes);

#endif
