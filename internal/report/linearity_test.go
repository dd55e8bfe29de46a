package report

import (
	"encoding/json"
	"strings"
	"testing"
)

// TestLinearityTable: a stage without a P1dB reads "not given", never a blank or a number;
// the output points follow OIP3 = IIP3 + G (Pozar, Microwave Engineering, §10.3) and
// OP1dB = IP1dB + G − 1 dB (Razavi, RF Microelectronics, §2.2.2), and the headroom at the
// chain input is OP1dB less the stage's output level; the JSON carries the same numbers.
func TestLinearityTable(t *testing.T) {
	r := load(t, `
[rx]
nf          = "= cascade_nf(chain)"
chain_input = "-50 dBm"
[[rx.chain]]
stage = "filter"
loss  = "2 dB"
[[rx.chain]]
stage = "LNA"
gain  = "20 dB"
nf    = "1 dB"
iip3  = "-5 dBm"
ip1db = "-15 dBm"
`)
	page, _ := Markdown(Input{Result: r})
	// filter: nothing given. LNA: OIP3 −5 + 20 = 15 dBm, OP1dB −15 + 20 − 1 = 4 dBm, cumulative
	// referred through the filter's −2 dB (IIP3 −3 dBm, IP1dB −13 dBm), output −50 − 2 + 20 =
	// −32 dBm, 36 dB under the OP1dB.
	for _, row := range []string{
		"| 1 | filter | not given | not given | not given | not given | not given | not given | not given | not given | -52.00 dBm | not given |",
		"| 2 | LNA | -5.00 dBm | 15.00 dBm | -3.00 dBm | 15.00 dBm | -15.00 dBm | 4.00 dBm | -13.00 dBm | 4.00 dBm | -32.00 dBm | 36.00 dB |",
	} {
		if !strings.Contains(string(page), row) {
			t.Errorf("page lacks the row\n%s\n%s", row, page)
		}
	}
	var doc struct {
		Chains map[string]struct {
			Stages []map[string]any `json:"stages"`
			InDBm  float64          `json:"input_dbm"`
			OP1dB  float64          `json:"op1db_dbm"`
		} `json:"chains"`
	}
	out := JSON(Input{Result: r})
	if err := json.Unmarshal(out, &doc); err != nil {
		t.Fatal(err)
	}
	ch := doc.Chains["rx.chain"]
	// The chain's IP1dB is the LNA's referred through the filter, −13 dBm, and its OP1dB
	// −13 + 18 − 1 = 4 dBm: the LNA's own, since the filter does not compress.
	if ch.InDBm != -50 || ch.OP1dB != 4 {
		t.Errorf("chain input %g dBm, OP1dB %g dBm; want -50 and 4", ch.InDBm, ch.OP1dB)
	}
	if len(ch.Stages) == 2 {
		lna := ch.Stages[1]
		if lna["oip3_dbm"] != 15.0 || lna["op1db_dbm"] != 4.0 || lna["below_op1db_db"] != 36.0 {
			t.Errorf("LNA in JSON: %v", lna)
		}
		if _, has := ch.Stages[0]["op1db_dbm"]; has {
			t.Errorf("the filter gives no P1dB, yet JSON has one: %v", ch.Stages[0])
		}
	} else {
		t.Errorf("JSON stages: %v", ch.Stages)
	}
}
