package org.forkscape.web.compare;

import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.zip.ZipEntry;
import java.util.zip.ZipException;
import java.util.zip.ZipInputStream;
import org.forkscape.InputException;
import org.forkscape.compare.RunFiles;
import org.forkscape.run.MemoryEstimate;
import org.forkscape.run.RunOutputs;

/**
 * A second run uploaded to the compare page as a zip of its folder: its specifications.csv, summary.json and
 * plan.json, at the top of the zip or in one folder inside it (other files are skipped). Each is written
 * under its own name into the comparison's folder, never under the entry's path, and the three together may
 * unpack to no more than the server's upload limit, so that a small zip cannot fill the disk.
 */
final class UploadedRun {
    /** Where the three files go inside the comparison's folder. */
    static final String FOLDER = "uploaded";

    private UploadedRun() {
    }

    /**
     * @param zip      the upload's bytes
     * @param zipName  the file's name as the browser sent it, for messages (never used as a path)
     * @param into     an empty folder of the comparison, written to
     * @param maxBytes the most the three files may hold unpacked
     */
    static RunFiles unpack(InputStream zip, String zipName, Path into, long maxBytes) {
        Map<String, String> found = new LinkedHashMap<>();
        long total = 0;
        try (ZipInputStream in = new ZipInputStream(zip)) {
            boolean anyEntry = false;
            for (ZipEntry e = in.getNextEntry(); e != null; e = in.getNextEntry()) {
                anyEntry = true;
                String name = e.getName().replace('\\', '/');
                String file = name.substring(name.lastIndexOf('/') + 1);
                boolean shallow = name.indexOf('/') == name.lastIndexOf('/');
                if (e.isDirectory() || !RunOutputs.FILES.contains(file) || !shallow) {
                    continue;
                }
                if (found.containsKey(file)) {
                    throw new InputException(zipName, "holds two files named " + file + " (" + found.get(file)
                            + " and " + name + "); zip the files of one run folder");
                }
                found.put(file, name);
                total += copy(in, into.resolve(file), total, maxBytes, zipName);
            }
            if (!anyEntry) {
                throw new InputException(zipName, "is not a zip file, or is an empty one; zip a run folder's "
                        + String.join(", ", RunOutputs.FILES));
            }
        } catch (ZipException e) {
            throw new InputException(zipName, "is not a readable zip file (" + e.getMessage() + ")");
        } catch (IOException e) {
            throw new InputException(zipName, "could not be read to its end (" + e.getMessage() + ")");
        }
        List<String> missing = new ArrayList<>(RunOutputs.FILES);
        missing.removeAll(found.keySet());
        if (!missing.isEmpty()) {
            throw new InputException(zipName, "has no " + String.join(" and no ", missing) + "; zip a run folder's "
                    + String.join(", ", RunOutputs.FILES) + ", as run wrote them");
        }
        Path named = Path.of(zipName);
        return new RunFiles(named, RunFileReader.object(into.resolve(RunOutputs.PLAN), named),
                RunFileReader.object(into.resolve(RunOutputs.SUMMARY), named), into.resolve(RunOutputs.SPECIFICATIONS));
    }

    /** A failure to read is the upload's ({@link InputException}); a failure to write is the workspace's. */
    private static long copy(InputStream in, Path target, long before, long maxBytes, String zipName)
            throws IOException {
        byte[] buffer = new byte[64 * 1024];
        long written = 0;
        OutputStream out = opened(target);
        try (out) {
            for (int n = in.read(buffer); n >= 0; n = in.read(buffer)) {
                written += n;
                if (before + written > maxBytes) {
                    throw new InputException(zipName, "unpacks to more than this server accepts for an upload ("
                            + MemoryEstimate.format(maxBytes) + ", setting forkscape.data.max-upload)");
                }
                write(out, buffer, n, target);
            }
        }
        return written;
    }

    private static OutputStream opened(Path target) {
        try {
            return Files.newOutputStream(target);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot write " + target + ": " + e.getMessage(), e);
        }
    }

    private static void write(OutputStream out, byte[] buffer, int n, Path target) {
        try {
            out.write(buffer, 0, n);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot write " + target + ": " + e.getMessage(), e);
        }
    }
}
