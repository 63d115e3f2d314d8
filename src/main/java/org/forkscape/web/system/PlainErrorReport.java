package org.forkscape.web.system;

import java.io.IOException;
import java.io.Writer;
import java.util.concurrent.atomic.AtomicBoolean;
import org.apache.catalina.connector.Request;
import org.apache.catalina.connector.Response;
import org.apache.catalina.valves.ErrorReportValve;
import org.apache.coyote.ActionCode;

/**
 * The servlet container's answer to a request it refuses before any page sees it (an address that is
 * not a valid URL, an over-long request line): one plain sentence with the same security headers as
 * every other answer, instead of the container's HTML report. Errors a page has answered are left
 * alone.
 */
public final class PlainErrorReport extends ErrorReportValve {
    @Override
    protected void report(Request request, Response response, Throwable throwable) {
        int status = response.getStatus();
        if (status < 400 || response.getContentWritten() > 0 || !response.setErrorReported()) {
            return;
        }
        AtomicBoolean writable = new AtomicBoolean(false);
        response.getCoyoteResponse().action(ActionCode.IS_IO_ALLOWED, writable);
        if (!writable.get()) {
            return;
        }
        try {
            SecurityHeadersFilter.addHeaders(response);
            response.setContentType("text/plain");
            response.setCharacterEncoding("UTF-8");
            Writer out = response.getReporter();
            if (out != null) {
                out.write(status < 500 ? "The request cannot be served as sent (HTTP " + status + "); check the address.\n"
                        : "The server could not answer (HTTP " + status + ").\n");
                response.finishResponse();
            }
        } catch (IOException | IllegalStateException e) {
            // the client has gone or the response cannot take a body: nothing more to say
        }
    }
}
