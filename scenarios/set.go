package scenarios

import "fmt"

// LookupAll looks up each built-in name or file as Lookup does, and refuses
// two scenarios of the same name (a file cannot take a built-in's name;
// Parse refuses that): tables, reports and manifests tell scenarios apart
// by name. The error for a repeated file name carries the file and line of
// the second and names the first.
func LookupAll(namesOrFiles []string) ([]*Scenario, error) {
	out := make([]*Scenario, 0, len(namesOrFiles))
	first := map[string]*Scenario{}
	for _, arg := range namesOrFiles {
		s, err := Lookup(arg)
		if err != nil {
			return nil, err
		}
		if prev, ok := first[s.Name]; ok {
			if s.file == "" {
				return nil, fmt.Errorf("scenarios: built-in scenario %q given twice", s.Name)
			}
			return nil, &KeyError{File: s.file, Line: s.line, Key: "name",
				Msg: fmt.Sprintf("%q is also the name of the scenario in %s: each scenario of a run needs its own name", s.Name, prev.where())}
		}
		first[s.Name] = s
		out = append(out, s)
	}
	return out, nil
}

// where locates the scenario's name for messages: file:line, or the file.
func (s *Scenario) where() string {
	if s.line > 0 {
		return fmt.Sprintf("%s:%d", s.file, s.line)
	}
	return s.file
}
