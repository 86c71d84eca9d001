// Package testscenario holds scenario texts that the tests of several
// packages share. Every number in them is illustrative.
package testscenario

// UndefinedStretch is logistic growth with harvest H and a small term
// log(x − c) whose threshold c is uncertain, uniform on [−1, 0.4]: log(x −
// c) is undefined for x ≤ c, so the rate law has an undefined stretch
// [0, c] inside the domain exactly in the draws with c > 0, about 0.4/1.4
// of them, whatever the harvest (analytic). Tests of the fault counts use
// it.
const UndefinedStretch = `holdfast: 1
title: harvested stock with an undefined stretch (illustrative numbers)
state: {symbol: x, domain: [0, 6]}
rate: "r*x*(1 - x/K) - H + 0.01*log(x - c)"
parameters:
  r: {dist: uniform, min: 0.8, max: 1.2}
  K: {value: 4}
  H: {value: 0.5}
  c: {dist: uniform, min: -1, max: 0.4, nominal: -0.5}
`
