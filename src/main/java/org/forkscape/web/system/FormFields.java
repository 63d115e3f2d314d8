package org.forkscape.web.system;

import org.forkscape.run.SettingNames;

/**
 * The plan page's fields as its form labels them (frontend/js/plan/plan-form.js, section "How the run is
 * made"), for the messages the server sends a browser user: they name the field to change, never a
 * command-line option.
 */
public final class FormFields {
    /** Where a browser user asks for a seeded random sample. */
    public static final String SAMPLE = "the plan page's fields \"Fit a random sample of\" and \"Seed\" (under "
            + "\"How the run is made\")";
    /** The settings as the web door names them in messages written below it. */
    public static final SettingNames SETTINGS = new SettingNames(SAMPLE,
            "the plan page's field \"Largest number of specifications\"");

    private FormFields() {
    }
}
