"""Bad input raises strewn.InputError (a ValueError) with the engine's one-line message, the
text the command line prints for the same fault."""
import numpy as np
import pytest

import strewn


def one_line(e):
    text = str(e.value)
    assert text and "\n" not in text
    return text


def test_input_error_is_a_value_error():
    assert issubclass(strewn.InputError, ValueError)


def test_negative_sigma_gives_the_cli_message(cli, source_dir):
    # tests/data/cli/negative_sigma.toml: spread = { sigma = -1.0 }; the CLI builds it with the
    # engine's from_axes and prints the engine's message after the file, line and key.
    with pytest.raises(strewn.InputError) as e:
        strewn.Normal.from_axes((0, 0), -1.0, -1.0, 0.0)
    status, out, err = cli("assess", source_dir / "tests/data/cli/negative_sigma.toml")
    assert status == 2 and one_line(e) in err, (str(e.value), err)
    with pytest.raises(strewn.InputError) as e:
        strewn.Normal.from_cep((0, 0), -1.0)
    assert one_line(e) == "cep must be a positive finite number (got -1)"


def test_fit_errors_match_the_cli(cli, source_dir):
    # tests/data/fit/two_points.csv: too few impacts; identical.csv: no spread.
    for name, xy in (("two_points.csv", [[0.1, 0.2], [0.3, 0.1]]), ("identical.csv", [[1, 1]] * 3)):
        with pytest.raises(strewn.InputError) as e:
            strewn.fit_impacts(np.array(xy), aim=(0, 0))
        status, out, err = cli("fit", source_dir / "tests/data/fit" / name, "--aim", 0, 0)
        assert status == 2 and one_line(e) in err, (str(e.value), err)


def test_bad_regions_and_options():
    with pytest.raises(strewn.InputError) as e:
        strewn.shape("dsik", centre=[0, 0], radius=1)
    assert "dsik" in one_line(e)
    with pytest.raises(strewn.InputError) as e:
        strewn.Region.disk((0, 0), -1.0)
    assert "radius" in one_line(e)
    with pytest.raises(strewn.InputError) as e:
        strewn.Region.from_wkt("POLYGON ((0 0, 1 1, 1 0, 0 1, 0 0))")  # a bow tie
    one_line(e)
    with pytest.raises(strewn.InputError) as e:
        strewn.probability(strewn.Normal.from_cep((0, 0), 1), strewn.Region.disk((0, 0), 1), method="exakt")
    assert "exakt" in one_line(e)
    with pytest.raises(strewn.InputError):
        strewn.probability(strewn.Normal.from_cep((0, 0), 1), strewn.Region.disk((0, 0), 1), rel_tol=-1)
    with pytest.raises(strewn.InputError) as e:
        strewn.Mixture([(0.5, strewn.Normal.from_cep((0, 0), 1))])
    assert "sum" in one_line(e)
    with pytest.raises(strewn.InputError):
        strewn.Normal((0, 0), [[1.0, 2.0], [2.0, 1.0]])  # not positive definite
    with pytest.raises(strewn.InputError):
        strewn.probability_at(strewn.Normal.from_cep((0, 0), 1), strewn.Region.disk((0, 0), 1), [0.0, np.nan], 0.0)
    with pytest.raises(strewn.InputError) as e:
        strewn.probability_at(strewn.Normal.from_cep((0, 0), 1), strewn.Region.disk((0, 0), 1), np.zeros(3), np.zeros(4))
    assert "broadcast" in one_line(e)
    with pytest.raises(strewn.InputError):
        strewn.probability(strewn.Normal.from_cep((0, 0), 1), 42)
    with pytest.raises(strewn.InputError):
        strewn.fit_counts(0.5, 10, 1.0)


def test_counts_with_none_inside_are_refused_as_the_command_refuses_them(cli):
    # 0 of 10 within 1 m bounds sigma from below only (Clopper-Pearson: the share's one-sided
    # upper bound 1 - 0.05^(1/10) = 0.2589, sigma >= 1 / sqrt(-2 ln(1 - 0.2589)) = 1.2918 m).
    # It returned sigma = inf before, which a script could pass on as a spread (every zone's p 0).
    with pytest.raises(strewn.InputError) as e:
        strewn.fit_counts(0, 10, 1.0)
    message = one_line(e)
    assert "0 of 10 impacts within 1 m" in message
    assert "sigma >= 1.292 m" in message
    status, _, err = cli("fit", "--counts", "0", "10", "--radius", "1", "--aim", "0", "0")
    assert status == 2
    assert "sigma >= 1.292 m" in err


def test_messages_name_the_range_and_the_missing_parameter():
    m = strewn.Normal.from_cep((0, 0), 1)
    r = strewn.Region.disk((0, 0), 1)
    # The scenario's settings.samples range (1 to 1e12), not 0 to 2^64 - 1.
    for bad in (-5, 0):
        with pytest.raises(strewn.InputError) as e:
            strewn.probability(m, r, method="monte_carlo", samples=bad)
        assert "samples must be a whole number from 1 to 1000000000000" in one_line(e)
    # The t without nu: said so, not "must be in (0, 1e6] (got 0)".
    with pytest.raises(strewn.InputError) as e:
        m.with_family("student_t")
    assert "needs nu" in one_line(e)


def test_fit_functions_take_the_commands_ranges():
    """A statistician's trial: the module took coordinates of 1e13, a confidence of 0.3 and
    counts of 1e13, all refused by `strewn fit`, and 2**70 counts raised TypeError."""
    import numpy as np

    xy = np.array([[0.0, 0.0], [1.0, 0.2], [0.3, 1.1], [0.8, 0.9]])
    cases = [
        (lambda: strewn.fit_impacts(xy * 1e13, aim=(0, 0)), "at most 1e12"),
        (lambda: strewn.fit_impacts(xy, aim=(0, 0), confidence=0.3), "confidence must be 0.5 to 0.9999"),
        (lambda: strewn.fit_counts(4, 10**13, 0.3), "at most 1e12"),
        (lambda: strewn.fit_counts(4, 2**70, 0.3), "at most 1e12"),
        (lambda: strewn.fit_censored([0.1, 0.2], 10**13, 0.6), "at most 1e12"),
        (lambda: strewn.fit_censored([[0.1, 0.2], [0.3, 0.1]], 2, 0.6), "radii must be a list"),
        (lambda: strewn.fit_counts(4, 10, 0.3, confidence=0.3), "confidence must be 0.5 to 0.9999"),
    ]
    for call, message in cases:
        with pytest.raises(strewn.InputError, match=message):
            call()
