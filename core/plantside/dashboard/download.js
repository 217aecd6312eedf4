// plantside download helper: turns bytes sent from the kernel into a file in the
// browser user's downloads. No network access, no external modules.
//
// The kernel sends a custom message {kind: "plantside-download", filename, mime}
// with the file's bytes as the first binary buffer.

function saveBuffer(buffer, filename, mime) {
  const blob = new Blob([buffer], { type: mime || "application/octet-stream" });
  const url = URL.createObjectURL(blob);
  const link = document.createElement("a");
  link.href = url;
  link.download = filename;
  link.rel = "noopener";
  link.style.display = "none";
  document.body.appendChild(link);
  link.click();
  setTimeout(() => {
    URL.revokeObjectURL(url);
    link.remove();
  }, 2000);
}

function onMessage(model, msg, buffers) {
  if (!msg || msg.kind !== "plantside-download" || !buffers || buffers.length === 0) {
    return;
  }
  const name = String(msg.filename || "plantside-export").replace(/[\\/:*?"<>|]/g, "_");
  saveBuffer(buffers[0], name, String(msg.mime || ""));
  model.set("delivered", model.get("delivered") + 1);
  model.save_changes();
}

export default {
  initialize({ model }) {
    const handler = (msg, buffers) => onMessage(model, msg, buffers);
    model.on("msg:custom", handler);
    return () => model.off("msg:custom", handler);
  },
  render({ el }) {
    el.classList.add("plantside-download");
    el.style.display = "none";
  },
};
