package dev.watcher.notify;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.util.Arrays;
import java.util.Base64;
import java.util.HexFormat;
import org.junit.jupiter.api.Test;

/**
 * HMAC-SHA256 against the test vectors of RFC 4231 ("Identifiers and Test Vectors for HMAC-SHA-224,
 * HMAC-SHA-256, HMAC-SHA-384, and HMAC-SHA-512"), section 4: test cases 1, 2, 3, 4, 6 and 7 (case 5 is a
 * truncated output and is left out). The signing layout is the Standard Webhooks specification's
 * ({@code id.timestamp.body}, header {@code v1,<base64>}, secrets as {@code whsec_<base64>}).
 */
class SignatureTest {

    private static byte[] hex(String h) {
        return HexFormat.of().parseHex(h);
    }

    private static byte[] repeat(int b, int n) {
        byte[] a = new byte[n];
        Arrays.fill(a, (byte) b);
        return a;
    }

    private static byte[] ascii(String s) {
        return s.getBytes(StandardCharsets.US_ASCII);
    }

    private static String mac(byte[] key, byte[] data) {
        return HexFormat.of().formatHex(Signature.hmacSha256(key, data));
    }

    @Test
    void rfc4231Case1TwentyByteKey() {
        assertEquals("b0344c61d8db38535ca8afceaf0bf12b881dc200c9833da726e9376c2e32cff7",
                mac(repeat(0x0b, 20), ascii("Hi There")));
    }

    @Test
    void rfc4231Case2KeyShorterThanOutput() {
        assertEquals("5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843",
                mac(ascii("Jefe"), ascii("what do ya want for nothing?")));
    }

    @Test
    void rfc4231Case3CombinedKeyAndDataOf50Bytes() {
        assertEquals("773ea91e36800e46854db8ebd09181a72959098b3ef8c122d9635514ced565fe",
                mac(repeat(0xaa, 20), repeat(0xdd, 50)));
    }

    @Test
    void rfc4231Case4TwentyFiveByteKey() {
        assertEquals("82558a389a443c0ea4cc819899f2083a85f0faa3e578f8077a2e3ff46729665b",
                mac(hex("0102030405060708090a0b0c0d0e0f10111213141516171819"), repeat(0xcd, 50)));
    }

    @Test
    void rfc4231Case6KeyLargerThanBlockIsHashedFirst() {
        assertEquals("60e431591ee0b67f0d8a26aacbf5b77f8e0bc6213728c5140546040f0ee37f54",
                mac(repeat(0xaa, 131), ascii("Test Using Larger Than Block-Size Key - Hash Key First")));
    }

    @Test
    void rfc4231Case7KeyAndDataLargerThanBlock() {
        assertEquals("9b09ffa71b942fcb27635fbcd5b0e944bfdc63644f0713938a7f51535c3a35e2",
                mac(repeat(0xaa, 131), ascii("This is a test using a larger than block-size key and a larger than "
                        + "block-size data. The key needs to be hashed before being used by the HMAC algorithm.")));
    }

    @Test
    void whsecPrefixedSecretIsBase64DecodedAndRawSecretIsItsBytes() {
        byte[] raw = repeat(0x0b, 20);
        assertArrayEquals(raw, Signature.key("whsec_" + Base64.getEncoder().encodeToString(raw)));
        assertArrayEquals(ascii("Jefe"), Signature.key("Jefe"));
    }

    @Test
    void headerIsVersionedBase64OfHmacOverIdDotTimestampDotBody() {
        // RFC 4231 case 2 reused: with key "Jefe", the signed content must be exactly the bytes given here
        byte[] key = ascii("Jefe");
        String header = Signature.header(key, "n-1", 1700000000L, ascii("{}"));
        byte[] expected = Signature.hmacSha256(key, ascii("n-1.1700000000.{}"));
        assertEquals("v1," + Base64.getEncoder().encodeToString(expected), header);
    }

    @Test
    void verifierAcceptsTheSignatureAndRejectsChangedBodyIdOrTimestamp() {
        byte[] key = Signature.key("whsec_" + Base64.getEncoder().encodeToString(ascii("a shared secret")));
        byte[] body = ascii("{\"run\":\"hx-header-07\"}");
        String h = Signature.header(key, "n-9", 1700000123L, body);
        assertTrue(Signature.verify(key, "n-9", 1700000123L, body, "v1,bm90IGl0 " + h));
        assertFalse(Signature.verify(key, "n-9", 1700000123L, ascii("{\"run\":\"hx-header-08\"}"), h));
        assertFalse(Signature.verify(key, "n-8", 1700000123L, body, h));
        assertFalse(Signature.verify(key, "n-9", 1700000124L, body, h));
        assertFalse(Signature.verify(key, "n-9", 1700000123L, body, null));
    }
}
