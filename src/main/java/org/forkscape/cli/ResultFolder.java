package org.forkscape.cli;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.channels.FileChannel;
import java.nio.channels.FileLock;
import java.nio.channels.OverlappingFileLockException;
import java.nio.file.DirectoryStream;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.LinkOption;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.nio.file.attribute.BasicFileAttributes;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Objects;
import java.util.UUID;
import java.util.stream.Stream;
import org.forkscape.InputException;

/**
 * The {@code --out} folder of a batch run, replaced as a whole. The run writes its files into a hidden
 * staging folder beside it ({@code .NAME.forkscape-staging-...}); at the end the entries of the old folder
 * that are not result files (the user's notes, sub-folders) move into the staging folder, the old folder
 * moves aside and the staging folder takes its name, each a rename in the same parent folder, and the old
 * results are deleted. A reader therefore sees the old set of result files or the new one, never a mix.
 *
 * <p>A hidden lock file beside the folder ({@code .NAME.forkscape-lock}, an operating-system lock that
 * ends with the process) keeps a second run from the same folder, and a shutdown hook removes the staging
 * folder when the process is stopped (SIGTERM, SIGINT) before the swap; a stop during the swap waits for
 * it to finish. Only a hard kill or a power loss during the few renames of the swap can leave the old
 * results, or the user's entries, in a hidden folder beside {@code --out}.
 */
final class ResultFolder implements AutoCloseable {
    private static final List<Path> SYSTEM_VIEWS = List.of(Path.of("/proc"), Path.of("/sys"));

    private final Path folder;
    private final Path lockFile;
    private final FileChannel lockChannel;
    private final FileLock lock;
    private final Path staging;
    private final Path createdAncestor;
    private final Thread hook;
    private Path old;
    private boolean finished;
    /** Whether an entry of the user's could not be moved back out of the staging folder, which then stays. */
    private boolean stranded;

    private ResultFolder(Path folder, Path lockFile, FileChannel lockChannel, FileLock lock, Path staging,
            Path createdAncestor) {
        this.folder = folder;
        this.lockFile = lockFile;
        this.lockChannel = lockChannel;
        this.lock = lock;
        this.staging = staging;
        this.createdAncestor = createdAncestor;
        this.hook = new Thread(this::stopped, "forkscape-out-cleanup");
        Runtime.getRuntime().addShutdownHook(hook);
    }

    /**
     * Refuses, before any work, an output path that is a file, lies under a view of the running system
     * ({@code /proc}, {@code /sys}), or that this process cannot write (the folder, or the nearest folder
     * above it that exists, and its parent, where the staging folder goes).
     */
    static void check(Path given) {
        Path folder = given.toAbsolutePath().normalize();
        String named = "--out " + given;
        if (Files.exists(folder) && !Files.isDirectory(folder)) {
            throw new UsageException(named + " is a file; give a folder for the results");
        }
        if (folder.getParent() == null) {
            throw new UsageException(named + " is the root folder; give a folder inside it for the results");
        }
        Path existing = folder;
        while (!Files.exists(existing)) {
            existing = existing.getParent();
        }
        Path real;
        try {
            real = existing.toRealPath();
        } catch (IOException e) {
            throw new UsageException(named + " cannot be resolved (" + e.getClass().getSimpleName() + ")");
        }
        for (Path view : SYSTEM_VIEWS) {
            if (real.startsWith(view)) {
                throw new UsageException(named + " is under " + view + ", a view of the running system, not a "
                        + "place for files; give another folder for the results");
            }
        }
        if (!Files.isDirectory(existing)) {
            throw new UsageException(named + ": " + existing + " is a file, so the folder cannot be made there");
        }
        Path writable = existing.equals(folder) ? folder.getParent() : existing;
        if (!Files.isWritable(writable) || existing.equals(folder) && !Files.isWritable(folder)) {
            throw new UsageException(named + " is not writable here (" + (Files.isWritable(writable) ? folder
                    : writable) + " does not allow it); give a folder you can write to");
        }
    }

    /**
     * Takes the folder's lock and makes its staging folder (and any missing folder above it).
     *
     * @throws InputException when another run holds the lock
     */
    static ResultFolder open(Path given) {
        Path folder = given.toAbsolutePath().normalize();
        Path parent = folder.getParent();
        String name = folder.getFileName().toString();
        Path created = null;
        try {
            Path missing = parent;
            while (!Files.exists(missing)) {
                created = missing;
                missing = missing.getParent();
            }
            Files.createDirectories(parent);
            Path lockFile = parent.resolve("." + name + ".forkscape-lock");
            FileChannel channel = FileChannel.open(lockFile, StandardOpenOption.CREATE, StandardOpenOption.READ,
                    StandardOpenOption.WRITE);
            Object opened = fileKey(lockFile);
            FileLock lock = lockOrNull(channel);
            if (lock == null || !stillNamed(lockFile, opened)) {
                channel.close();
                throw new InputException("--out " + given, "another Forkscape run is writing into this folder (it "
                        + "holds " + lockFile + "); wait for it to end, or give another --out");
            }
            Path staging = Files.createDirectory(parent.resolve("." + name + ".forkscape-staging-" + UUID.randomUUID()));
            return new ResultFolder(folder, lockFile, channel, lock, staging, created);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot prepare --out " + given + ": " + e.getMessage(), e);
        }
    }

    private static FileLock lockOrNull(FileChannel channel) throws IOException {
        try {
            return channel.tryLock();
        } catch (OverlappingFileLockException e) {
            // another run in this same process holds it
            return null;
        }
    }

    /**
     * Whether the lock file's name still points to the file that was opened and locked: a run that ends
     * deletes its lock file, and one that opened it just before then would otherwise hold a lock no one else
     * sees. The file is only looked up, never opened a second time: closing any other descriptor of a file
     * drops the process's POSIX locks on it.
     */
    private static boolean stillNamed(Path lockFile, Object opened) throws IOException {
        try {
            return Objects.equals(opened, fileKey(lockFile));
        } catch (NoSuchFileException e) {
            return false;
        }
    }

    /** The file system's identity of a file (null where it has none, so that names alone are compared). */
    private static Object fileKey(Path file) throws IOException {
        return Files.readAttributes(file, BasicFileAttributes.class, LinkOption.NOFOLLOW_LINKS).fileKey();
    }

    /** Where the run writes its files. */
    Path staging() {
        return staging;
    }

    /**
     * Swaps the staged files in as the folder.
     *
     * @throws InputException when an entry of the old folder cannot join the new one (a folder named as a
     *                        result file this run wrote)
     */
    void commit() {
        synchronized (this) {
            if (finished) {
                throw new IllegalStateException("the run is stopping");
            }
            List<Path> moved = new ArrayList<>();
            try {
                if (Files.exists(folder, LinkOption.NOFOLLOW_LINKS)) {
                    keepTheUsersEntries(moved);
                    old = folder.resolveSibling("." + folder.getFileName() + ".forkscape-old-" + UUID.randomUUID());
                    Files.move(folder, old, StandardCopyOption.ATOMIC_MOVE);
                }
                Files.move(staging, folder, StandardCopyOption.ATOMIC_MOVE);
            } catch (IOException e) {
                giveBack(moved);
                throw new UncheckedIOException("cannot replace --out " + folder + ": " + e.getMessage(), e);
            }
            finished = true;
        }
    }

    /** Moves every entry of the old folder that is not one of its result files into the staging folder. */
    private void keepTheUsersEntries(List<Path> moved) throws IOException {
        List<Path> entries = new ArrayList<>();
        try (DirectoryStream<Path> stream = Files.newDirectoryStream(folder)) {
            stream.forEach(entries::add);
        }
        for (Path entry : entries) {
            if (EarlierResultFiles.isResult(entry)) {
                continue;
            }
            Path target = staging.resolve(entry.getFileName());
            if (Files.exists(target, LinkOption.NOFOLLOW_LINKS)) {
                giveBack(moved);
                throw new InputException(entry.toString(), "is named as a result file of this run but is not a "
                        + "file; rename or move it and run again");
            }
            try {
                Files.move(entry, target, StandardCopyOption.ATOMIC_MOVE);
            } catch (FileAlreadyExistsException e) {
                giveBack(moved);
                throw new InputException(entry.toString(), "cannot join the new results; rename it and run again");
            }
            moved.add(target);
        }
    }

    private void giveBack(List<Path> moved) {
        for (Path entry : moved) {
            try {
                Files.move(entry, folder.resolve(entry.getFileName()), StandardCopyOption.ATOMIC_MOVE);
            } catch (IOException e) {
                stranded = true;
            }
        }
        moved.clear();
    }

    /** The shutdown hook: a stop before the swap abandons the staged files; a swap under way finishes first. */
    private void stopped() {
        abandon();
        release();
    }

    /** Deletes the staged files of a run that did not commit; true when it had not. */
    private synchronized boolean abandon() {
        if (finished) {
            return false;
        }
        finished = true;
        if (!stranded) {
            deleteTree(staging);
        }
        return true;
    }

    /**
     * Ends the run's hold on the folder: removes the staging folder of a run that did not commit (and the
     * folders it created above it), the old results of one that did, and the lock.
     */
    @Override
    public void close() {
        boolean abandoned = abandon();
        release();
        try {
            Runtime.getRuntime().removeShutdownHook(hook);
        } catch (IllegalStateException e) {
            // the process is already stopping, and the hook does the same work
        }
        if (abandoned && createdAncestor != null) {
            deleteEmptyUpTo(folder.getParent(), createdAncestor);
        }
    }

    private synchronized void release() {
        if (old != null) {
            deleteTree(old);
        }
        if (!lockChannel.isOpen()) {
            return;
        }
        try {
            Files.deleteIfExists(lockFile);
            lock.release();
            lockChannel.close();
        } catch (IOException ignored) {
            // the operating system drops the lock when the process ends; a stale hidden file holds no lock
        }
    }

    /** Deletes a folder and everything in it; a writer may still be adding a file, so it tries a few times. */
    private static void deleteTree(Path root) {
        for (int attempt = 0; attempt < 5 && Files.exists(root, LinkOption.NOFOLLOW_LINKS); attempt++) {
            try (Stream<Path> walk = Files.walk(root)) {
                for (Path p : walk.sorted(Comparator.reverseOrder()).toList()) {
                    Files.deleteIfExists(p);
                }
            } catch (IOException | UncheckedIOException ignored) {
                // tried again: a file appeared or vanished while walking
            }
        }
    }

    private static void deleteEmptyUpTo(Path from, Path top) {
        for (Path p = from; p != null && p.startsWith(top); p = p.getParent()) {
            try {
                Files.deleteIfExists(p);
            } catch (IOException e) {
                return;
            }
        }
    }
}
