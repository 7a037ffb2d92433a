#!/usr/bin/env node
// The command line's entry point: a committed shim so that npm can link the bin at install time,
// before `npm run build` has produced dist/.
'use strict';
require('../dist/cli.js');
