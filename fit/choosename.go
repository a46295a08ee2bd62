package fit

import (
	"errors"
	"fmt"
	"strings"
)

// Choose makes the model named name (poly1, poly2, poly3, piecewise) the
// comparison's choice in place of the auto rule's, as a user who names the
// model asks: it moves the Chosen mark and Solution to that row, says in
// Reason that the model was named and which the auto rule picks, recomputes
// the validity horizons for it ([Horizon]) and re-marks every row's
// predictions against them. Naming the auto rule's own choice changes only
// Reason.
//
// Errors: no row of that name (the model was not a candidate), or a row
// whose model could not be fitted (its Err).
func (c *Comparison) Choose(name string) error {
	idx := -1
	var names []string
	for i, r := range c.Rows {
		names = append(names, r.Model)
		if r.Model == name {
			idx = i
		}
	}
	if idx < 0 {
		return fmt.Errorf("fit: model %s is not among the compared models (%s)", name, strings.Join(names, ", "))
	}
	row := c.Rows[idx]
	if row.Solution == nil && row.Orbit == nil {
		msg := row.Err
		if !strings.HasPrefix(msg, "fit: ") {
			msg = "fit: " + name + ": " + msg
		}
		return errors.New(msg)
	}
	auto, why := c.Chosen, c.Reason
	if name == auto {
		c.Reason = fmt.Sprintf("%s named by the user; the auto rule picks it too: %s", name, why)
		return nil
	}
	for i := range c.Rows {
		c.Rows[i].Chosen = i == idx
	}
	c.Chosen, c.Orbit = name, row.Orbit
	if row.Solution != nil {
		c.Solution = row.Solution
	}
	c.Reason = fmt.Sprintf("%s named by the user; the auto rule would pick %s: %s", name, auto, why)
	h := horizon(c)
	c.HorizonDays, c.HorizonBeforeDays, c.HorizonAfterDays, c.HorizonRule = h.days, h.before, h.after, h.rule
	tr := c.Solution.Track
	first, last := tr.ArcTT()
	for i := range c.Rows {
		if c.Rows[i].Orbit != nil {
			continue // an orbit has no polynomial horizon
		}
		for j := range c.Rows[i].Preds {
			markHorizon(&c.Rows[i].Preds[j], tr, first, last, h)
		}
		if len(c.Rows[i].Preds) > 0 {
			c.Rows[i].Pred = &c.Rows[i].Preds[0]
		}
	}
	return nil
}
