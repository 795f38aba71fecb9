"""Every notebook in notebooks-demo/ (whatever is there) and the kernel's own fixture notebooks run
top to bottom through Debian's nbclient with the chernel kernel, with no error output."""

import unittest
from pathlib import Path

import harness
import nbformat
from nbclient import NotebookClient

NOTEBOOKS = sorted((harness.ROOT / "notebooks-demo").glob("*.ipynb")) + sorted((Path(__file__).parent / "notebooks").glob("*.ipynb"))


class Notebooks(unittest.TestCase):
    def test_every_notebook_runs_without_error_output(self):
        self.assertTrue(NOTEBOOKS, "no notebook found (the kernel's own fixture should always be there)")
        for path in NOTEBOOKS:
            with self.subTest(notebook=path.name):
                nb = nbformat.read(path, as_version=4)
                client = NotebookClient(nb, kernel_name=harness.KERNEL_NAME, timeout=600, resources={"metadata": {"path": str(path.parent)}})
                client.execute()
                errors = [
                    (i, out.get("ename"), out.get("evalue"))
                    for i, cell in enumerate(nb.cells)
                    if cell.cell_type == "code"
                    for out in cell.get("outputs", [])
                    if out.get("output_type") == "error"
                ]
                self.assertEqual(errors, [], f"{path.name}: cells with errors")
                code_cells = [c for c in nb.cells if c.cell_type == "code"]
                self.assertTrue(all(c.get("execution_count") for c in code_cells), f"{path.name}: a cell did not run")
                if path.name == "kernel-tour.ipynb":
                    self.check_tour(code_cells)

    def test_nbconvert_shows_every_widget_and_figure_of_the_demos_as_a_picture(self):
        """Debian's nbconvert, as `jupyter nbconvert --to html` runs it, on each shipped demo: one PNG
        per widget and per figure output, and no widget script (whose runtime it would fetch online)."""
        from nbconvert import HTMLExporter

        for path in sorted((harness.ROOT / "notebooks-demo").glob("*.ipynb")):
            with self.subTest(notebook=path.name):
                nb = nbformat.read(path, as_version=4)
                pictured = [
                    o for c in nb.cells if c.cell_type == "code" for o in c.get("outputs", [])
                    if {"application/vnd.jupyter.widget-view+json", "application/vnd.plotly.v1+json"} & set(o.get("data", {}))
                ]
                self.assertTrue(pictured)
                self.assertTrue(all("image/png" in o["data"] for o in pictured))
                body, _ = HTMLExporter().from_notebook_node(nb)
                self.assertEqual(body.count('<img src="data:image/png;base64,'), len(pictured))
                self.assertNotIn('type="application/vnd.jupyter.widget-view+json"', body)

    def check_tour(self, cells):
        """What the fixture shows: a model table, a summary and its figure (live and as a picture), a
        progress bar finished by the result."""
        self.assertIn("text/html", cells[0].outputs[0]["data"])
        self.assertEqual(cells[1].outputs[0]["data"]["text/plain"], "[ true, true, true ]")
        summary, figure = cells[2].outputs
        self.assertIn("text/html", summary["data"])
        self.assertEqual(sorted(figure["data"]), ["application/vnd.plotly.v1+json", "image/png", "text/plain"])
        # nbclient applies update_display_data in place: the bar's output now holds the phase map's
        # summary, and its figure follows.
        final, figure = cells[3].outputs[0]["data"], cells[3].outputs[1]["data"]
        self.assertIn("phase-map result", final["text/plain"])
        self.assertIn("application/vnd.plotly.v1+json", figure)
        self.assertIn("image/png", figure)
        texts = [o["data"]["text/plain"] for o in cells[4].outputs if o.get("output_type") == "display_data"]
        self.assertEqual(texts, ["'second version'"])
        self.assertIn("printed 9", "".join(o.get("text", "") for o in cells[4].outputs if o.get("output_type") == "stream"))


if __name__ == "__main__":
    unittest.main()
