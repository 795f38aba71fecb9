#!/usr/bin/env node
// The `chernel` command: the compiled command line, cli/main.ts (build with `npm run build`).
import '../dist/cli/main.js';
