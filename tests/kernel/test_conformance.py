"""Conformance of the chernel kernel with the Jupyter messaging protocol, checked by Debian's
jupyter_kernel_test (the Jupyter project's own kernel test class) over real ZeroMQ sockets.
Every sample type that jupyter_kernel_test supports is filled in."""

import unittest

import harness  # noqa: F401  (installs the kernelspec and sets JUPYTER_PATH)
import jupyter_kernel_test

class ChernelConformance(jupyter_kernel_test.KernelTests):
    kernel_name = harness.KERNEL_NAME
    language_name = "typescript"
    file_extension = ".ts"

    code_hello_world = 'console.log("hello, world")'
    code_stderr = 'console.error("written to stderr")'

    # Engine API names, JavaScript globals and members after a dot.
    completion_samples = [
        {"text": "validateMod", "matches": {"validateModel"}},
        {"text": "Math.ab", "matches": {"abs"}},
        {"text": "const ok = Number.isInt", "matches": {"isInteger"}},
    ]

    complete_code_samples = ["const a = 1", "function f(x: number): number { return x * 2 }", "interface P { x: number }"]
    incomplete_code_samples = ["function f() {", "const xs = [1, 2,", "const s = `abc", "/* a comment"]
    invalid_code_samples = ["const 1x = 2", "let = = 3", 'const s = "abc']

    code_generate_error = 'throw new Error("boom")'

    code_execute_result = [
        {"code": "6 * 7", "result": "42"},
        {"code": "'a' + 'b'", "result": "'ab'"},
        {"code": "const n: number = [1, 2, 3].length; n", "result": "3"},
    ]
    code_display_data = [
        {"code": "display({x: 1})", "mime": "text/plain"},
        # An engine result without a figure: one output, its summary (a model or a plottable result
        # shows a second output, its picture, which carries no HTML).
        {"code": "display(compute({kind: 'chern', model: qwz(), params: {u: -1}, bands: 1}))", "mime": "text/html"},
    ]

    # Glob pattern matching exactly one of the code_execute_result inputs.
    code_history_pattern = "6*7"
    supported_history_operations = ("tail", "range", "search")

    code_inspect_sample = "validateModel"
    code_clear_output = "clearOutput()"


if __name__ == "__main__":
    unittest.main()
