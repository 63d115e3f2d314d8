package org.forkscape.data;

import java.io.IOException;
import java.io.InputStream;
import java.io.Reader;
import java.nio.ByteBuffer;
import java.nio.CharBuffer;
import java.nio.charset.CharsetDecoder;
import java.nio.charset.CoderResult;
import java.nio.charset.CodingErrorAction;
import java.nio.charset.StandardCharsets;

/**
 * Decodes UTF-8 and refuses any invalid byte sequence, reporting the line it sits on. The JDK's
 * {@link java.io.InputStreamReader} decodes ahead in blocks, so its error cannot say where in the file
 * the bad byte was; this reader counts line breaks (CR, LF and CR LF each end one line, as the CSV
 * parser counts them) in everything it has decoded, so the error names the exact line.
 */
final class StrictUtf8Reader extends Reader {
    /** An invalid UTF-8 sequence at a known line and byte offset. */
    static final class InvalidUtf8Exception extends IOException {
        final long line;
        final long byteOffset;
        /** The offending byte, or -1 when the file ends inside a character. */
        final int firstByte;

        InvalidUtf8Exception(long line, long byteOffset, int firstByte) {
            super("invalid UTF-8 at line " + line);
            this.line = line;
            this.byteOffset = byteOffset;
            this.firstByte = firstByte;
        }
    }

    /** A NUL character, which no CSV text holds (a binary file, or a name with a NUL in it). */
    static final class NulCharacterException extends IOException {
        final long line;

        NulCharacterException(long line) {
            super("NUL character at line " + line);
            this.line = line;
        }
    }

    private final InputStream in;
    private final CharsetDecoder decoder = StandardCharsets.UTF_8.newDecoder()
            .onMalformedInput(CodingErrorAction.REPORT)
            .onUnmappableCharacter(CodingErrorAction.REPORT);
    private final ByteBuffer bytes = ByteBuffer.allocate(1 << 16).flip();
    private final CharBuffer chars = CharBuffer.allocate(1 << 16).flip();
    private long bytesBeforeBuffer;
    private boolean endOfInput;
    private long line = 1;
    private char previous;

    /**
     * @param in          read from its current position; the caller owns it and closes it
     * @param bytesBefore bytes of the file already consumed (a byte-order mark), for offsets in messages
     */
    StrictUtf8Reader(InputStream in, long bytesBefore) {
        this.in = in;
        this.bytesBeforeBuffer = bytesBefore;
    }

    @Override
    public int read(char[] buffer, int offset, int length) throws IOException {
        if (length == 0) {
            return 0;
        }
        if (!chars.hasRemaining() && !fill()) {
            return -1;
        }
        int n = Math.min(length, chars.remaining());
        chars.get(buffer, offset, n);
        return n;
    }

    private boolean fill() throws IOException {
        chars.clear();
        while (true) {
            CoderResult result = decoder.decode(bytes, chars, endOfInput);
            if (result.isError()) {
                countLines(chars.position());
                boolean truncated = endOfInput && result.length() == bytes.remaining();
                int bad = truncated ? -1 : bytes.get(bytes.position()) & 0xFF;
                throw new InvalidUtf8Exception(line, bytesBeforeBuffer + bytes.position(), bad);
            }
            if (chars.position() > 0) {
                countLines(chars.position());
                chars.flip();
                return true;
            }
            if (endOfInput) {
                chars.flip();
                return false;
            }
            bytesBeforeBuffer += bytes.position();
            bytes.compact();
            int n = in.read(bytes.array(), bytes.arrayOffset() + bytes.position(), bytes.remaining());
            if (n < 0) {
                endOfInput = true;
            } else {
                bytes.position(bytes.position() + n);
            }
            bytes.flip();
        }
    }

    private void countLines(int upTo) throws NulCharacterException {
        for (int i = 0; i < upTo; i++) {
            char c = chars.get(i);
            if (c == '\0') {
                throw new NulCharacterException(line);
            }
            if (c == '\r' || c == '\n' && previous != '\r') {
                line++;
            }
            previous = c;
        }
    }

    /** Leaves the stream open: whoever opened it closes it. */
    @Override
    public void close() {
        chars.clear().flip();
    }
}
