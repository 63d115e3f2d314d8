package org.forkscape.web.system;

import jakarta.servlet.http.HttpServletRequest;
import java.io.IOException;
import java.nio.file.FileSystemException;
import org.forkscape.InputException;
import org.forkscape.run.Workspace;
import org.forkscape.run.WorkspaceWriteException;
import org.forkscape.web.explore.RunNotFinishedException;
import org.forkscape.web.run.RunQueueFullException;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.springframework.http.HttpStatus;
import org.springframework.http.ResponseEntity;
import org.springframework.util.unit.DataSize;
import org.springframework.beans.factory.annotation.Value;
import org.springframework.web.ErrorResponse;
import org.springframework.web.bind.MissingServletRequestParameterException;
import org.springframework.web.bind.annotation.ControllerAdvice;
import org.springframework.web.bind.annotation.ExceptionHandler;
import org.springframework.web.method.annotation.MethodArgumentTypeMismatchException;
import org.springframework.web.multipart.MaxUploadSizeExceededException;
import org.springframework.web.multipart.MultipartException;
import org.springframework.web.servlet.ModelAndView;
import org.springframework.web.servlet.resource.NoResourceFoundException;

/**
 * Turns every failure into one plain message: a {@link Problem} for the JSON API ({@code /api/...}), the
 * error page otherwise. Problems the user can fix get their own status and sentence; anything else is
 * logged with its stack trace and shown as an internal error, never as a trace.
 */
@ControllerAdvice
class ErrorAdvice {
    private static final Logger LOG = LoggerFactory.getLogger(ErrorAdvice.class);

    private final DataSize maxUpload;
    private final Workspace workspace;

    ErrorAdvice(@Value("${spring.servlet.multipart.max-file-size}") DataSize maxUpload, Workspace workspace) {
        this.maxUpload = maxUpload;
        this.workspace = workspace;
    }

    @ExceptionHandler(InputException.class)
    Object input(InputException e, HttpServletRequest request) {
        return answer(request, HttpStatus.BAD_REQUEST, e.where(), e.problem());
    }

    @ExceptionHandler({NotFoundException.class, NoResourceFoundException.class})
    Object notFound(Exception e, HttpServletRequest request) {
        String message = e instanceof NotFoundException ? e.getMessage() : "there is nothing at this address";
        return answer(request, HttpStatus.NOT_FOUND, "", message);
    }

    @ExceptionHandler(RunQueueFullException.class)
    Object busy(RunQueueFullException e, HttpServletRequest request) {
        return answer(request, HttpStatus.SERVICE_UNAVAILABLE, "", e.getMessage());
    }

    /**
     * A full disk answers 507 (Insufficient Storage), a workspace that cannot be written 503: both are the
     * server's state, not the request's, and the same request can succeed once space is freed or the folder
     * made writable. The sentence names no path; the log has the cause.
     */
    @ExceptionHandler(WorkspaceWriteException.class)
    Object storage(WorkspaceWriteException e, HttpServletRequest request) {
        LOG.error("{} {}: {}", request.getMethod(), request.getRequestURI(), e.getMessage(), e.getCause());
        return answer(request, e.diskFull() ? HttpStatus.INSUFFICIENT_STORAGE : HttpStatus.SERVICE_UNAVAILABLE, "",
                e.getMessage());
    }

    /** A table the memory budget has no room for: 507 above the limit, 503 while other uploads hold it. */
    @ExceptionHandler(MemoryBudgetException.class)
    Object memory(MemoryBudgetException e, HttpServletRequest request) {
        return answer(request, e.overLimit() ? HttpStatus.INSUFFICIENT_STORAGE : HttpStatus.SERVICE_UNAVAILABLE,
                "file", e.getMessage());
    }

    @ExceptionHandler(MaxUploadSizeExceededException.class)
    Object tooLarge(MaxUploadSizeExceededException e, HttpServletRequest request) {
        return answer(request, HttpStatus.PAYLOAD_TOO_LARGE, "file", "the file is larger than this server accepts ("
                + maxUpload.toMegabytes() + " MB, setting forkscape.data.max-upload)");
    }

    /**
     * An upload the server could not spool into the workspace (its parts above the threshold go to a folder
     * there) is the workspace's state, answered as {@link #storage}; any other multipart failure is the
     * request's.
     */
    @ExceptionHandler(MultipartException.class)
    Object badUpload(MultipartException e, HttpServletRequest request) {
        for (Throwable t = e.getCause(); t != null; t = t.getCause()) {
            if (t instanceof IOException io) {
                WorkspaceWriteException failure = workspace.writeFailure(io, "the upload was not kept");
                if (failure.diskFull() || io instanceof FileSystemException) {
                    return storage(failure, request);
                }
            }
        }
        return answer(request, HttpStatus.BAD_REQUEST, "file", "the upload could not be read: send the data file (CSV or Parquet) as "
                + "the form field \"file\" of a multipart/form-data request");
    }

    @ExceptionHandler({MissingServletRequestParameterException.class, MethodArgumentTypeMismatchException.class})
    Object badParameter(Exception e, HttpServletRequest request) {
        String name = e instanceof MissingServletRequestParameterException m ? m.getParameterName()
                : ((MethodArgumentTypeMismatchException) e).getName();
        return answer(request, HttpStatus.BAD_REQUEST, name, e instanceof MissingServletRequestParameterException
                ? "is required" : "is not a value of the expected type");
    }

    @ExceptionHandler(RunNotFinishedException.class)
    Object conflict(RunNotFinishedException e, HttpServletRequest request) {
        return answer(request, HttpStatus.CONFLICT, "", e.getMessage());
    }

    @ExceptionHandler(Exception.class)
    Object internal(Exception e, HttpServletRequest request) {
        if (e instanceof ErrorResponse framework && framework.getStatusCode().is4xxClientError()) {
            // the request itself is wrong (method, media type, ...): the framework's own sentence says how
            String detail = framework.getBody().getDetail();
            return answer(request, HttpStatus.valueOf(framework.getStatusCode().value()), "",
                    detail == null ? "the request cannot be served as sent" : detail);
        }
        LOG.error("{} {} failed", request.getMethod(), request.getRequestURI(), e);
        return answer(request, HttpStatus.INTERNAL_SERVER_ERROR, "", "internal error (" + e.getClass().getSimpleName()
                + "); the server log has the details");
    }

    private static Object answer(HttpServletRequest request, HttpStatus status, String where, String message) {
        return answer(request.getRequestURI().startsWith(request.getContextPath() + "/api/"), status, where, message);
    }

    /** A problem for the JSON API ({@code api} true) or the error page. */
    static Object answer(boolean api, HttpStatus status, String where, String message) {
        if (api) {
            return ResponseEntity.status(status).body(new Problem(where == null ? "" : where, message));
        }
        ModelAndView page = new ModelAndView("error");
        page.setStatus(status);
        page.addObject("status", status.value());
        page.addObject("reason", status.getReasonPhrase());
        page.addObject("where", where);
        page.addObject("message", message);
        return page;
    }
}
