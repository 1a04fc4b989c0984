// Package runfolder treats a run folder as one unit: one writer that
// stages a whole run and commits it in one step, and one reader that
// refuses a folder without a complete, committed set.
//
// # Writing
//
// Create takes an exclusive lock on the target folder (a lock file beside
// it, ".NAME.lidscope-lock", held with flock(2)), removes the staging
// folders that killed runs left beside it, refuses a folder it may not
// replace, and creates one hidden staging folder beside the target
// (".NAME.lidscope-staging-*", in the same parent, so the final move is a
// rename within one file system). It also checks, before any computation,
// that the parent folder is writable and that its file system has room
// for the estimated outputs.
//
// Every writer of the run (maps, series, tables, summary, provenance,
// relationships, run state, figures) writes into the one *Stage; nothing
// commits on its own. Commit syncs every staged file, writes the run
// manifest (run-manifest.json: every file with its size and SHA-256, last
// of all) and moves the staging folder into place in one step: a rename
// when the target does not exist, and an atomic exchange of the two
// folders (renameat2 RENAME_EXCHANGE) when it does, after which the earlier
// run, now in the staging folder, is removed. A process killed at any
// moment therefore leaves the target holding either the earlier complete
// run or the new complete run, plus at most a staging folder that the next
// Create removes. Close removes the staging folder of a run that was not
// committed (an error, a cancelled context, a signal) and releases the
// lock.
//
// Where the file system cannot exchange two folders, Commit moves the
// earlier run aside (".NAME.lidscope-retired-*") and the new one into
// place; a crash between the two renames leaves no target and the earlier
// run aside, which the next Create puts back.
//
// # Reading
//
// Open takes a shared lock (so a run that is replacing the folder makes it
// fail at once, naming that process), reads the manifest and checks that
// every file it lists is there with its size, and that the files the
// caller needs are among them. A folder without a manifest (an interrupted
// run of an older lidscope, a folder put together by hand, a partial copy)
// is refused with the list of the missing files.
package runfolder
