/* test_sha256.c - the digest the reports print for each input file, against
 * the examples of NIST FIPS 180-4 (the SHA-256 examples of the NIST
 * "Cryptographic Standards and Guidelines: Examples with Intermediate Values",
 * SHA256.pdf: "abc" and the 448-bit message; the one-million-'a' message of
 * FIPS 180-2 appendix B.3) and against Debian python3's hashlib on catalog files. */
#include <criterion/criterion.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "core/sha256.h"
#include "support.h"

TestSuite(sha256, .init = ps_test_init);

static void digest_of(const void *p, size_t n, char hex[65])
{
    ps_sha256 c;
    ps_sha256_init(&c);
    ps_sha256_add(&c, p, n);
    ps_sha256_hex(&c, hex);
}

Test(sha256, published_examples)
{
    char hex[65];
    digest_of("abc", 3, hex);
    cr_expect_str_eq(hex, "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    const char *m = "abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq";
    digest_of(m, strlen(m), hex);
    cr_expect_str_eq(hex, "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
    digest_of("", 0, hex); /* the empty message, FIPS 180-2 padding of zero bits */
    cr_expect_str_eq(hex, "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
}

/* One million 'a' fed in uneven pieces: the block buffer across calls. */
Test(sha256, million_a_in_pieces)
{
    static char a[1000000];
    memset(a, 'a', sizeof a);
    ps_sha256 c;
    ps_sha256_init(&c);
    size_t at = 0, step = 1;
    while (at < sizeof a) {
        size_t n = step < sizeof a - at ? step : sizeof a - at;
        ps_sha256_add(&c, a + at, n);
        at += n;
        step = step * 7 % 997 + 1;
    }
    char hex[65];
    ps_sha256_hex(&c, hex);
    cr_expect_str_eq(hex, "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
}

/* Every message length 0..200 (all the padding cases around 55/56/64 bytes)
 * and the project's catalogs, against hashlib. */
Test(sha256, agrees_with_python_hashlib)
{
    if (!PS_ORACLE_PYTHON[0])
        cr_skip_test("no Debian python3");
    char path[256];
    ps_test_temp_name(path, sizeof path, "ps_sha_");
    int fd = mkstemp(path);
    cr_assert_geq(fd, 0);
    FILE *f = fdopen(fd, "w");
    unsigned char msg[200];
    for (size_t i = 0; i < sizeof msg; i++)
        msg[i] = (unsigned char)(i * 37 + 11);
    for (size_t n = 0; n <= sizeof msg; n++) {
        char hex[65];
        digest_of(msg, n, hex);
        fprintf(f, "%zu %s\n", n, hex);
    }
    const char *files[] = {PS_SOURCE_DIR "/catalogs/demo-variants.yaml", PS_SOURCE_DIR "/catalogs/demo-variants.csv"};
    for (size_t i = 0; i < 2; i++) {
        char hex[65];
        uint64_t bytes = 0;
        cr_assert_eq(ps_sha256_file(files[i], hex, &bytes), 0, "%s", files[i]);
        cr_expect_gt(bytes, 0);
        fprintf(f, "F %s %s\n", files[i], hex);
    }
    fclose(f);
    char cmd[512];
    snprintf(cmd, sizeof cmd,
             "%s -c 'import hashlib,sys\n"
             "m=bytes((i*37+11)%%256 for i in range(200))\n"
             "bad=0\n"
             "for l in open(sys.argv[1]):\n"
             " a=l.split()\n"
             " d=hashlib.sha256(open(a[1],\"rb\").read() if a[0]==\"F\" else m[:int(a[0])]).hexdigest()\n"
             " bad+=d!=a[-1]\n"
             "sys.exit(1 if bad else 0)' %s",
             PS_ORACLE_PYTHON, path);
    int rc = system(cmd);
    unlink(path);
    cr_expect_eq(rc, 0, "hashlib disagrees on some message (exit %d)", rc);
}

Test(sha256, unreadable_file_is_an_error)
{
    char hex[65];
    cr_expect_eq(ps_sha256_file("/nonexistent/catalog.yaml", hex, NULL), -1);
}
