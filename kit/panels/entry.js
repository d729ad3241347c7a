// TextEntry: a one-line text box whose text goes to the kernel when Enter is pressed or the
// box loses focus (as an ipywidgets Text with continuous_update=False), and nothing else:
// no separate "submit" message, so one Enter costs the kernel one request, not two.

export default {
  render({ model, el }) {
    el.classList.add("hl-entry");
    const input = document.createElement("input");
    input.type = "text";
    input.className = "hl-entry-input";
    input.spellcheck = false;
    input.autocomplete = "off";
    el.appendChild(input);

    const show = () => {
      const v = model.get("value");
      if (input.value !== v) input.value = v;
      input.disabled = !!model.get("disabled");
      input.placeholder = model.get("placeholder") || "";
    };
    const commit = () => {
      if (input.value !== model.get("value")) {
        model.set("value", input.value);
        model.save_changes();
      }
    };
    // keys typed here are the box's, not the notebook's shortcuts
    input.addEventListener("keydown", (e) => {
      e.stopPropagation();
      if (e.key === "Enter") commit();
    });
    input.addEventListener("keypress", (e) => e.stopPropagation());
    input.addEventListener("change", commit);
    model.on("change:value", show);
    model.on("change:disabled", show);
    model.on("change:placeholder", show);
    show();
  },
};
