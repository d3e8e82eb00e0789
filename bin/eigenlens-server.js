#!/usr/bin/env node
'use strict';
require('../dist/server.js');
