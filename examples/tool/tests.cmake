# End-to-end cases of the heldout tool: heldout_tool_test(NAME EXIT_CODE REGEX [JSON] ARGS...).
# Exit codes: 0 success, 1 a problem in the file (named by line and column), 2 usage, 3 I/O.

# one test set, wide layout: tables, then JSON checked against scipy, then plots
heldout_tool_test(wide_tables 0 "Estimates.*logistic +classification error.*Wilson score.*DeLong paired"
                  {DATA}/wide.csv --truth failed --score logistic --score knn)
heldout_tool_test(wide_json 0 "\"comparisons\"" JSON
                  {DATA}/wide.csv --truth failed --score logistic --score knn --score margin --level 0.9)
heldout_tool_test(wide_plots 0 "Plots written to.*roc.svg calibration.svg"
                  {DATA}/wide.csv --truth failed --score logistic --score knn --plots {WORK}/plots)
heldout_tool_test(raw_scores 0 "margin: scores outside \\[0, 1\\] are ranked only"
                  {DATA}/wide.csv --truth failed --score margin)
# long layout gives the same numbers as the wide one (JSON check compares with scipy)
heldout_tool_test(long_json 0 "\"name\": \"knn\"" JSON {DATA}/long.csv --truth failed --score p --model model)
# resampled predictions: corrected t over the 10 folds
heldout_tool_test(resampled_tables 0 "10 splits in column 'fold'.*corrected t \\(Nadeau-Bengio\\), 10 splits"
                  {DATA}/resampled.csv --truth failed --score logistic --score knn --split fold --folds 10)
heldout_tool_test(resampled_json 0 "corrected resampled t" JSON
                  {DATA}/resampled.csv --truth failed --score logistic --score knn --split fold --folds 10
                  --plots {WORK}/plots)
# RFC 4180 quoting in names and cells, CRLF, '+' and spaces around numbers
heldout_tool_test(quoted 0 "model \"A\", v2" {DATA}/quoted.csv --truth failed --score "model \"A\", v2")

# errors in the file name line and column (exit code 1)
heldout_tool_test(missing_column 1 "line 1: no column named 'lr' \\(the columns are 'pump', 'failed'"
                  {DATA}/wide.csv --truth failed --score lr)
heldout_tool_test(bad_cell 1 "bad_cell.csv: line 3, column 3 \\('knn'\\): 'n/a' is not a number"
                  {DATA}/bad_cell.csv --truth failed --score logistic --score knn)
heldout_tool_test(bad_truth 1 "line 3, column 1 \\('failed'\\): truth must be 0 or 1, got '2'"
                  {DATA}/bad_truth.csv --truth failed --score logistic)
heldout_tool_test(one_class 1 "column 1 \\('failed'\\): class 1 never occurs"
                  {DATA}/bad_one_class.csv --truth failed --score logistic)
heldout_tool_test(ragged 1 "line 3: 3 fields where the header has 2" {DATA}/bad_ragged.csv --truth failed
                  --score logistic)
heldout_tool_test(open_quote 1 "line 1, column 2: quoted field not closed" {DATA}/bad_quote.csv --truth failed
                  --score logistic)
heldout_tool_test(long_pairing 1 "line 5, column 2 \\('failed'\\): truth differs from line 3"
                  {DATA}/bad_long_pairing.csv --truth failed --score p --model model)
# usage errors (exit code 2) and files that cannot be read (exit code 3)
heldout_tool_test(no_score 2 "--score is required" {DATA}/wide.csv --truth failed)
heldout_tool_test(split_needs_folds 2 "--split needs --folds K or --train-size N" {DATA}/resampled.csv --truth failed
                  --score logistic --split fold)
heldout_tool_test(bad_level 2 "--level" {DATA}/wide.csv --truth failed --score logistic --level 2)
heldout_tool_test(help 0 "Exit codes: 0 success; 1 a problem in the file" --help)
heldout_tool_test(no_file 3 "cannot open '.*nonexistent.csv' for reading" {DATA}/nonexistent.csv --truth failed
                  --score logistic)
