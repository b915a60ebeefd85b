package main

import "levelpath/optimizer"

// cautionText is printed with every plan output and in the README.
const cautionLine = optimizer.Caution

const cautionText = `CAUTION: levelpath is a planning aid, not certified for operational use.
The approved flight manual and operator data, the operator's procedures, ATC
and the pilot-in-command govern.`
