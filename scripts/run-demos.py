"""Executes the demo notebooks in place with the chernel kernel, saving their outputs. Each widget's
state travels in its own output (as a lab with default settings saves it), not in the notebook's
widget-state metadata, so nbconvert and untrusted viewers show the widget's picture.

Run with Debian's Python after `npm run setup`: /usr/bin/python3 scripts/run-demos.py [names...]
A notebook with an error output is reported and left unchanged on disk."""

import os
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
prefix = Path(tempfile.mkdtemp(prefix="chernel-demos-"))
subprocess.run(["node", str(ROOT / "bin" / "chernel.js"), "install", "--prefix", str(prefix)], check=True, capture_output=True)
os.environ["JUPYTER_PATH"] = os.pathsep.join([str(prefix / "share" / "jupyter"), os.environ.get("JUPYTER_PATH", "")])

import nbformat  # noqa: E402  (after JUPYTER_PATH is set)
from nbclient import NotebookClient  # noqa: E402

wanted = sys.argv[1:]
failed = False
for path in sorted((ROOT / "notebooks-demo").glob("*.ipynb")):
    if wanted and not any(w in path.name for w in wanted):
        continue
    nb = nbformat.read(path, as_version=4)
    nb.metadata.pop("widgets", None)  # from an older save: the outputs carry the state now
    client = NotebookClient(nb, kernel_name="chernel", timeout=600, store_widget_state=False, allow_errors=True,
                            resources={"metadata": {"path": str(path.parent)}})
    client.execute()
    errors = [(i, o.get("ename"), o.get("evalue")) for i, c in enumerate(nb.cells) if c.cell_type == "code"
              for o in c.get("outputs", []) if o.get("output_type") == "error"
              or (o.get("output_type") == "stream" and o.get("name") == "stderr")]
    if errors:
        failed = True
        print(f"{path.name}: not saved, errors in cells {errors}")
        continue
    nbformat.write(nb, path)
    print(f"{path.name}: executed and saved")
shutil.rmtree(prefix, ignore_errors=True)
sys.exit(1 if failed else 0)
