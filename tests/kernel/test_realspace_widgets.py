"""A real-space widget from a cell, through Debian's jupyter_client against the real kernel:
`show(qwz(), {kind: 'local-marker', optionSliders: {...}})` returns a widget whose result has the
marker, whose state keeps the option sliders' values beside the parameters', and whose controls a
cell moves with `setValues`. Physics: Qi, Wu, Zhang, PRB 74, 085308 (2006): QWZ C(lower) = +1 at
u = -1 (convention of /work/shared/references.md)."""

import json
import unittest

import harness

CELL = (
    "const lw = show(qwz(), {kind: 'local-marker', sizes: [8, 8], values: {u: -1}, "
    "optionSliders: {onsiteDisorder: [0, 8], seed: [0, 99, 1]}}); lw"
)


class RealSpaceWidgets(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.km, cls.kc = harness.start_kernel()

    @classmethod
    def tearDownClass(cls):
        harness.stop_kernel(cls.km, cls.kc)

    def value(self, code):
        return harness.value(self.kc, code)

    def test_marker_widget_with_option_sliders(self):
        reply, outputs = harness.run(self.kc, CELL, timeout=60)
        self.assertEqual(reply["status"], "ok", reply)
        data = [c["data"] for m, c, _ in outputs if m == "execute_result"][0]
        saved = data["application/vnd.chernel.widget-state+json"]
        self.assertEqual(saved["state"]["kind"], "local-marker")
        # The option sliders start at the low end of their ranges, beside the parameter values.
        self.assertEqual(saved["state"]["values"], {"u": -1, "onsiteDisorder": 0, "seed": 0})
        self.assertEqual(saved["state"]["options"]["optionSliders"], {"onsiteDisorder": [0, 8], "seed": [0, 99, 1]})
        self.assertIn("image/png", data)
        self.assertEqual(self.value("lw.result.marker.length"), "64")
        # The clean crystal's C beside the map (QWZ, PRB 74, 085308: +1 at u = -1).
        self.assertEqual(self.value("lw.result.cleanChern"), "1")
        centre = float(self.value("lw.result.marker[4 + 8 * 4]"))
        self.assertGreater(centre, 0.8)
        self.assertLess(centre, 1.2)
        # A cell moves the option sliders like the parameters; values off the steps are refused by name.
        reply, _ = harness.run(self.kc, "lw.setValues({onsiteDisorder: 2, seed: 7})")
        self.assertEqual(reply["status"], "ok")
        self.assertEqual(json.loads(self.value("JSON.stringify(lw.values)").strip("'")), {"u": -1, "onsiteDisorder": 2, "seed": 7})
        reply, _ = harness.run(self.kc, "lw.setValues({seed: 2.5})")
        self.assertEqual(reply["status"], "error")
        self.assertIn("setValues.seed", reply["evalue"])

    def test_bad_option_slider_is_refused_naming_it(self):
        reply, _ = harness.run(self.kc, "show(qwz(), {kind: 'local-marker', sizes: [6, 6], optionSliders: {u: [0, 1]}})")
        self.assertEqual(reply["status"], "error")
        self.assertIn("optionSliders.u", reply["evalue"])
        self.assertIn("model parameter", reply["evalue"])
        reply, _ = harness.run(self.kc, "show(qwz(), {kind: 'local-density', sizes: [6, 6], energy: 0, optionSliders: {sed: [0, 9, 1]}})")
        self.assertEqual(reply["status"], "error")
        self.assertIn("optionSliders.sed", reply["evalue"])
        # The kernel lives on.
        self.assertEqual(self.value("1 + 1"), "2")


if __name__ == "__main__":
    unittest.main()
