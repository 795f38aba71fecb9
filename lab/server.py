"""Serve the chernel JupyterLab front end with Debian's jupyter_server and jupyterlab_server.

Run with /usr/bin/python3 (the Debian interpreter that has those packages):

    /usr/bin/python3 lab/server.py --ServerApp.ip=127.0.0.1 --ServerApp.port=8888 \
        --ServerApp.token=SECRET --ServerApp.root_dir=notebooks-demo

Every run starts from empty user-settings and workspace folders (a saved workspace would reopen
old notebooks and ask about their kernels); pass --ChernelLab.user_settings_dir=... or
--ChernelLab.workspaces_dir=... to keep them somewhere instead.
"""

import atexit
import json
import os
import shutil
import sys
import tempfile

# Configuration files in ~/.jupyter must not change how this app behaves.
os.environ["JUPYTER_NO_CONFIG"] = "1"

from jupyterlab_server import LabServerApp  # noqa: E402  (after the environment is set)

HERE = os.path.dirname(os.path.abspath(__file__))
BUILD = os.path.join(HERE, "build")

with open(os.path.join(HERE, "package.json"), encoding="utf-8") as f:
    VERSION = json.load(f)["version"]


def fresh_dir(purpose):
    path = tempfile.mkdtemp(prefix=f"chernel-lab-{purpose}-")
    atexit.register(shutil.rmtree, path, ignore_errors=True)
    return path


def _jupyter_server_extension_points():
    return [{"module": __name__, "app": ChernelLab}]


class ChernelLab(LabServerApp):
    name = "chernel_lab"
    app_name = "chernel lab"
    app_version = VERSION
    extension_url = "/lab"
    default_url = "/lab"
    load_other_extensions = False

    static_dir = BUILD
    schemas_dir = os.path.join(BUILD, "schemas")
    themes_dir = os.path.join(BUILD, "themes")
    templates_dir = os.path.join(HERE, "templates")

    def initialize_settings(self):
        if not self._given("user_settings_dir"):
            self.user_settings_dir = fresh_dir("settings")
        if not self._given("workspaces_dir"):
            self.workspaces_dir = fresh_dir("workspaces")
        if not os.path.isfile(os.path.join(BUILD, "bundle.js")):
            sys.exit(f"chernel lab: {BUILD}/bundle.js is missing; build it with `npm run build` in lab/")
        super().initialize_settings()

    def _given(self, trait):
        """True when the trait was set on the command line or in config."""
        return trait in self.config.get(type(self).__name__, {})


if __name__ == "__main__":
    ChernelLab.launch_instance()
