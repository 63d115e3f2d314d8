package org.forkscape.run;

/**
 * How a door names the settings a message sends its user to: the batch command's options, or the web
 * form's fields. A message written below the doors ({@link MultiverseRunner#checkCount}) takes the door's
 * names, so that a browser user is never told to type a command-line flag, and a terminal user never
 * pointed at a form.
 *
 * @param sample how to ask for a seeded random sample of the specifications
 * @param cap    how to raise the cap on the number of specifications
 */
public record SettingNames(String sample, String cap) {
    /** The batch command's options, with the plan keys that do the same. */
    public static final SettingNames COMMAND_LINE = new SettingNames(
            "--sample N --seed S (plan keys \"sample\" and \"seed\")",
            "--max-specifications (plan key \"maxSpecifications\")");
}
