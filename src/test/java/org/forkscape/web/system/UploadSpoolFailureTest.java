package org.forkscape.web.system;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;

import java.io.EOFException;
import java.io.IOException;
import java.nio.file.Path;
import java.util.concurrent.atomic.AtomicLong;
import org.forkscape.run.Workspace;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.springframework.http.ResponseEntity;
import org.springframework.mock.web.MockHttpServletRequest;
import org.springframework.util.unit.DataSize;
import org.springframework.web.multipart.MultipartException;

/**
 * An upload that the server cannot spool into the workspace (the container writes its large parts there)
 * is the workspace's state: 507 on a full disk, in words without a path; an upload the client broke off
 * stays the request's problem (400).
 */
class UploadSpoolFailureTest {
    @TempDir
    Path root;
    private final AtomicLong free = new AtomicLong(Long.MAX_VALUE);

    @Test
    void aFullDiskWhileSpoolingIs507AndABrokenUploadStays400() {
        ErrorAdvice advice = new ErrorAdvice(DataSize.ofMegabytes(200), new Workspace(root, folder -> free.get()));
        String part = root.resolve(".incoming/parts/upload_1.tmp").toString();
        MultipartException full = new MultipartException("Failed to parse multipart servlet request",
                new IOException(part + " (No space left on device)"));
        ResponseEntity<?> answer = (ResponseEntity<?>) advice.badUpload(full, api());
        assertEquals(507, answer.getStatusCode().value());
        Problem problem = (Problem) answer.getBody();
        assertEquals("the workspace's disk is full; the upload was not kept; earlier analyses and runs are intact",
                problem.message());
        assertFalse(problem.message().contains(root.toString()));

        MultipartException broken = new MultipartException("Failed to parse multipart servlet request",
                new EOFException("Unexpected EOF read on the socket"));
        assertEquals(400, ((ResponseEntity<?>) advice.badUpload(broken, api())).getStatusCode().value());
    }

    private static MockHttpServletRequest api() {
        return new MockHttpServletRequest("POST", "/api/analyses");
    }
}
