# End-to-end cases of the heldout tool:
#   heldout_tool_test(NAME EXIT_CODE REGEX [JSON] [SETUP] [STDIN file] [STDOUT file] ARGS...)
# Exit codes: 0 success, 1 a problem in the file (named by line and column), 2 usage, 3 I/O,
# 4 internal error (no case: it means a bug).

# one test set, wide layout: tables, then JSON checked against scipy, then plots
heldout_tool_test(wide_tables 0 "Estimates.*logistic +classification error \\(threshold 0.5\\).*Wilson.*paired DeLong"
                  {DATA}/wide.csv --truth failed --score logistic --score knn)
heldout_tool_test(wide_json 0 "\"comparisons\"" JSON
                  {DATA}/wide.csv --truth failed --score logistic --score knn --score margin --level 0.9)
heldout_tool_test(wide_plots 0 "Plots written to.*roc.svg calibration.svg"
                  {DATA}/wide.csv --truth failed --score logistic --score knn --plots {WORK}/plots)
heldout_tool_test(raw_scores 0 "margin: no Brier score \\(its scores leave \\[0, 1\\]: they are ranked only"
                  {DATA}/wide.csv --truth failed --score margin)
# long layout gives the same numbers as the wide one (JSON check compares with scipy)
heldout_tool_test(long_json 0 "\"name\": \"knn\"" JSON {DATA}/long.csv --truth failed --score p --model model)
# resampled predictions: corrected t over the 10 folds
heldout_tool_test(resampled_tables 0 "10 splits in column 'fold'.*corrected t \\(Nadeau-Bengio\\), 10 splits"
                  {DATA}/resampled.csv --truth failed --score logistic --score knn --split fold --folds 10)
heldout_tool_test(resampled_json 0 "\"method\": \"corrected_t\"" JSON
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
heldout_tool_test(unknown_option 2 "argument was not expected: --bogus" {DATA}/wide.csv --truth failed
                  --score logistic --bogus)
heldout_tool_test(missing_value 2 "--score: 1 required TEXT missing" {DATA}/wide.csv --truth failed --score)
heldout_tool_test(truth_twice 2 "--truth: At Most 1 required but received 2" {DATA}/wide.csv --truth failed
                  --truth failed --score logistic)
# NaN passes every range check (all comparisons with it are false): refused before them
heldout_tool_test(nan_train_size 2 "--train-size: Value nan is not a finite number" {DATA}/resampled.csv
                  --truth failed --score logistic --split fold --train-size nan)
heldout_tool_test(inf_train_size 2 "--train-size: Value inf is not a finite number" {DATA}/resampled.csv
                  --truth failed --score logistic --split fold --train-size inf)
heldout_tool_test(huge_train_size 2 "--train-size: Value 1e999 is not a finite number" {DATA}/resampled.csv
                  --truth failed --score logistic --split fold --train-size 1e999)
heldout_tool_test(nan_threshold 2 "--threshold: Value nan is not a finite number" {DATA}/wide.csv --truth failed
                  --score logistic --threshold nan)
heldout_tool_test(nan_level 2 "--level: Value NaN is not a finite number" {DATA}/wide.csv --truth failed
                  --score logistic --level NaN)
heldout_tool_test(text_threshold 2 "--threshold: Value abc not in range" {DATA}/wide.csv --truth failed
                  --score logistic --threshold abc)
heldout_tool_test(score_twice 2 "column 'logistic' is given twice to --score" {DATA}/wide.csv --truth failed
                  --score logistic --score knn --score logistic)
heldout_tool_test(truth_as_score 2 "column 'failed' is given to both --truth and --score" {DATA}/wide.csv
                  --truth failed --score failed)
heldout_tool_test(folds_and_train_size 2 "--folds excludes --train-size" {DATA}/resampled.csv --truth failed
                  --score logistic --split fold --folds 10 --train-size 270)
heldout_tool_test(folds_without_split 2 "--folds and --train-size go with --split" {DATA}/wide.csv --truth failed
                  --score logistic --folds 10)
heldout_tool_test(no_file 3 "cannot open '.*nonexistent.csv' for reading: No such file or directory"
                  {DATA}/nonexistent.csv --truth failed --score logistic)
heldout_tool_test(directory_as_file 3 "reading '.*data' failed: Is a directory" {DATA} --truth failed
                  --score logistic)
heldout_tool_test(plots_not_a_directory 3 "cannot create the plot directory '.*wide.csv/plots'" {DATA}/wide.csv
                  --truth failed --score logistic --plots {DATA}/wide.csv/plots)
# a write that fails (/dev/full refuses every write): exit 3, never 0 with a lost result
heldout_tool_test(stdout_full 3 "writing standard output failed: No space left on device" STDOUT /dev/full
                  {DATA}/wide.csv --truth failed --score logistic)
heldout_tool_test(stdout_full_json 3 "writing standard output failed" STDOUT /dev/full {DATA}/wide.csv
                  --truth failed --score logistic --json)
heldout_tool_test(help_stdout_full 3 "writing standard output failed" STDOUT /dev/full --help)
# "-" reads standard input
heldout_tool_test(stdin 0 "heldout: standard input: 300 rows, 2 models.*logistic vs knn" STDIN {DATA}/wide.csv
                  - --truth failed --score logistic --score knn)
heldout_tool_test(stdin_empty 1 "standard input: line 1: the file is empty" STDIN /dev/null - --truth failed
                  --score logistic)

# names with control characters, quotes and ill-formed UTF-8: valid JSON (check_json.py reads it
# back with a strict UTF-8 decode and compares the names with Python's U+FFFD replacement) and
# well-formed SVG (run_tool.cmake parses every plot with xml.etree)
heldout_tool_test(odd_names_json 0 "\"name\": \"ctl.u0001.u001f.end\", " JSON SETUP {WORK}/odd_names.csv --truth failed
                  --score p --model model --plots {WORK}/plots)
heldout_tool_test(odd_names_plots 0 "Plots written to.*roc.svg calibration.svg" SETUP {WORK}/odd_names.csv
                  --truth failed --score p --model model --plots {WORK}/plots)
# t intervals of measures in [0, 1] are clipped to it, with a note (the JSON check recomputes them)
heldout_tool_test(clip_resampled 0 "good, classification error \\(threshold 0.5\\): the corrected t \\(Nadeau-Bengio\\) interval \\[-0[.][0-9]+, 0[.][0-9]+\\] reaches outside \\[0, 1\\], where the measure lies; clipped to \\[0[.]0000, 0[.][0-9]+\\]"
                  SETUP {WORK}/low_error.csv --truth failed --score good --split fold --folds 10)
heldout_tool_test(clip_resampled_json 0 "\"clipped\": true" JSON SETUP {WORK}/low_error.csv --truth failed
                  --score good --split fold --folds 10)
# hard 0/1 probabilities: every squared error is 0 or 1, so the library's rule (ci::automatic)
# takes the Wilson interval for the Brier score, as for an error rate; the same numbers from
# the library's free functions
heldout_tool_test(brier_zero_one 0 "\"key\": \"brier\", \"measure\": \"Brier score\", [^}]*\"method\": \"wilson\"" LIBRARY SETUP
                  {WORK}/one_error.csv --truth failed --score good)

# ---- every task, against the library --------------------------------------------------
# TASKS: make_tasks.py writes a seeded file of each task into {WORK}; LIBRARY: check_library
# (check_library.cpp) computes the same estimates and comparisons from the library's free
# functions, without the tool's code, and check_library.py compares them to 1e-9 relative
# (values, intervals, differences, p-values; Holm-adjusted p present with 2 pairs or more).
heldout_tool_test(task_binary_library 0 "\"task\": \"binary\"" LIBRARY {DATA}/wide.csv --truth failed --score logistic
                  --score knn --score margin)
heldout_tool_test(task_binary_resampled_library 0 "\"splits\": 10" LIBRARY {DATA}/resampled.csv --truth failed
                  --score logistic --score knn --split fold --folds 10)
heldout_tool_test(task_regression 0 "regression task.*ridge +MSE.*Student t.*ridge vs tree +MSE" TASKS
                  {WORK}/regression.csv --task regression --truth y --score ridge --score tree)
heldout_tool_test(task_regression_library 0 "\"task\": \"regression\"" LIBRARY TASKS {WORK}/regression.csv
                  --task regression --truth y --score ridge --score tree)
heldout_tool_test(task_regression_resampled_library 0 "\"method\": \"corrected_t\"" LIBRARY TASKS
                  {WORK}/regression.csv --task regression --truth y --prediction ridge --prediction tree --split fold
                  --folds 10 --measure mse,mae --measure rmse --measure r2)
heldout_tool_test(task_multiclass 0 "multiclass task, truth 'y' \\(3 classes\\).*vote +classification error.*Wilson.*McNemar mid-p.*vote: no multiclass cross-entropy"
                  TASKS {WORK}/multiclass.csv --task multiclass --truth y --score vote --score soft --score mlp)
heldout_tool_test(task_multiclass_library 0 "\"classes\": 3" LIBRARY TASKS {WORK}/multiclass.csv --task multiclass
                  --truth y --score vote --score soft --score mlp)
heldout_tool_test(task_multiclass_resampled_library 0 "\"splits\": 8" LIBRARY TASKS {WORK}/multiclass.csv
                  --task multiclass --truth y --score vote --score soft --score mlp --split fold --folds 8)
# the long layout: class-probability columns p:0..2 of each model's rows
heldout_tool_test(task_multiclass_long 0 "2 models, multiclass task.*soft vs mlp +multiclass Brier score" TASKS
                  {WORK}/multiclass_long.csv --task multiclass --truth y --score p --model model)
heldout_tool_test(task_query 0 "40 queries in 'qid'.*NDCG@10.*Student t over queries.*paired randomization" TASKS
                  {WORK}/query.csv --task query --query qid --truth rel --score bm25 --score neural)
heldout_tool_test(task_query_library 0 "\"queries\": 40" LIBRARY TASKS {WORK}/query.csv --task query --query qid
                  --truth rel --score bm25 --score neural)
# 12 queries: the sign-flip p by exact enumeration of the 4096 sign vectors
heldout_tool_test(task_query_exact_library 0 "randomization p exact over all 4096 sign vectors" LIBRARY TASKS
                  {WORK}/query_small.csv --task query --query qid --truth rel --score bm25 --score neural
                  --measure ndcg@5,ap@0,mrr,p@3)
heldout_tool_test(task_query_resampled_library 0 "\"method\": \"corrected_t\"" LIBRARY TASKS {WORK}/query.csv
                  --task query --query qid --truth rel --score bm25 --score neural --split fold --folds 5)
heldout_tool_test(task_censored 0 "128 events.*Harrell's C.*infinitesimal jackknife" TASKS {WORK}/censored.csv
                  --task censored --time time --event event --score cox --score forest)
heldout_tool_test(task_censored_library 0 "\"events\": 128" LIBRARY TASKS {WORK}/censored.csv --task censored
                  --time time --event event --score cox --score forest --measure harrell-c,uno-c@2)
heldout_tool_test(task_censored_resampled_library 0 "\"method\": \"corrected_t\"" LIBRARY TASKS {WORK}/censored.csv
                  --task censored --time time --event event --score cox --score forest --split fold --folds 5
                  --measure harrell-c,uno-c@2)
# a measure no method of the library covers on one test set: a note saying why, exit 0
heldout_tool_test(task_censored_no_method 0 "AUC at time 1: no estimate: .*no interval method has a valid default"
                  TASKS {WORK}/censored.csv --task censored --time time --event event --score cox --measure auc@1)

# ---- the HTML report and the progress line --------------------------------------------
# check_report.py: self-contained (no script, no external reference, figures well-formed), then
# headless chromium loads it offline: its DOM has every figure and table, the screenshot is not blank
heldout_tool_test(report_binary 0 "Report written to" REPORT {DATA}/resampled.csv --truth failed --score logistic
                  --score knn --split fold --folds 10 --report {WORK}/report.html)
heldout_tool_test(report_multiclass 0 "Report written to" REPORT TASKS {WORK}/multiclass.csv --task multiclass
                  --truth y --score vote --score soft --score mlp --split fold --folds 8 --report {WORK}/report.html)
heldout_tool_test(report_query 0 "Report written to" REPORT TASKS {WORK}/query.csv --task query --query qid
                  --truth rel --score bm25 --score neural --split fold --folds 5 --report {WORK}/report.html)
heldout_tool_test(report_censored 0 "Report written to" REPORT TASKS {WORK}/censored.csv --task censored --time time
                  --event event --score cox --score forest --split fold --folds 5 --report {WORK}/report.html)
heldout_tool_test(report_not_writable 3 "report" {DATA}/wide.csv --truth failed --score logistic
                  --report {DATA}/wide.csv/report.html)
# on a terminal (script(1) gives one) a progress line on standard error; piped, nothing
heldout_tool_test(progress_terminal 0 "Estimates" TERMINAL {DATA}/resampled.csv --truth failed --score logistic
                  --score knn --split fold --folds 10)

# ---- usage of the new options (exit code 2) -------------------------------------------
heldout_tool_test(list_measures 0 "Measures of the query task.*\\* ndcg@10" --list-measures --task query)
heldout_tool_test(unknown_task 2 "--task: ranking not in {regression,binary,multiclass,query,censored}" {DATA}/wide.csv --task ranking --truth failed --score logistic)
heldout_tool_test(unknown_measure 2 "--measure: 'f1' is not a measure of the binary task \\(it has error, brier"
                  {DATA}/wide.csv --truth failed --score logistic --measure f1)
heldout_tool_test(bad_cutoff 2 "--measure: 'ndcg@x': the cutoff must be a whole number" TASKS {WORK}/query.csv
                  --task query --query qid --truth rel --score bm25 --measure ndcg@x)
heldout_tool_test(measure_twice 2 "--measure: 'auc' is given twice" {DATA}/wide.csv --truth failed
                  --score logistic --measure auc,brier,auc)
heldout_tool_test(query_needs_column 2 "--task query needs --query COL" TASKS {WORK}/query.csv --task query
                  --truth rel --score bm25)
heldout_tool_test(censored_needs_time 2 "--task censored needs --time COL and --event COL" TASKS
                  {WORK}/censored.csv --task censored --score cox)
heldout_tool_test(censored_no_truth 2 "--task censored takes --time and --event instead of --truth" TASKS
                  {WORK}/censored.csv --task censored --time time --event event --truth event --score cox)
# the file's content (exit code 1)
heldout_tool_test(bad_event 1 "column 4 \\('forest'\\): event must be 0 \\(censored\\) or 1" TASKS {WORK}/censored.csv
                  --task censored --time time --event forest --score cox)
heldout_tool_test(bad_query_id 1 "column 3 \\('bm25'\\): a query id must be a whole number" TASKS {WORK}/query.csv
                  --task query --query bm25 --truth rel --score neural)
