package org.stackwright.imagej;

import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.Component;
import java.awt.TextField;
import java.util.Map;

/**
 * Greys out the dialog fields that do not apply to what is chosen in the same dialog ({@link FieldRules}), and
 * updates them whenever a choice, checkbox or text changes. Plain AWT listeners on the fields, not a
 * {@code DialogListener}: ImageJ calls the first DialogListener to read every field when OK is pressed, which
 * would change how the dialog is read and recorded. A greyed-out field is still read and recorded.
 */
final class Greying {

    private final String operation;
    private final Map<String, Component[]> fields;

    private Greying(String operation, Map<String, Component[]> fields) {
        this.operation = operation;
        this.fields = fields;
    }

    /**
     * Listens to every field and sets the enabled state of each now.
     *
     * @param fields key to the field (first) and its label (second, when it has one)
     */
    static void attach(String operation, Map<String, Component[]> fields) {
        if (!FieldRules.hasRules(operation)) {
            return;
        }
        Greying g = new Greying(operation, fields);
        for (Component[] c : fields.values()) {
            if (c[0] instanceof Choice ch) {
                ch.addItemListener(e -> g.update());
            } else if (c[0] instanceof Checkbox cb) {
                cb.addItemListener(e -> g.update());
            } else if (c[0] instanceof TextField tf) {
                tf.addTextListener(e -> g.update());
            }
        }
        g.update();
    }

    /** @return the current text of a field: the chosen item, "true"/"false", or the typed text; null if absent */
    String state(String key) {
        Component[] c = fields.get(key);
        if (c == null) {
            return null;
        }
        if (c[0] instanceof Choice ch) {
            return ch.getSelectedItem();
        }
        if (c[0] instanceof Checkbox cb) {
            return Boolean.toString(cb.getState());
        }
        return c[0] instanceof TextField tf ? tf.getText() : null;
    }

    private void update() {
        for (Map.Entry<String, Component[]> e : fields.entrySet()) {
            boolean on = FieldRules.applies(operation, e.getKey(), this::state);
            for (Component c : e.getValue()) {
                if (c.isEnabled() != on) {
                    c.setEnabled(on);
                }
            }
        }
    }
}
