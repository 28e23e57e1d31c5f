"""Text lines and the plot for the spectrum, the ASE and the self-lasing verdict (formatting only)."""

from __future__ import annotations


def spectrum_lines(plan) -> list[str]:
    """Summary lines: self-lasing, the spectrum at the switch-out (if computed), the ASE."""
    out: list[str] = []
    sl = plan.self_lasing
    if sl is not None:
        verdict = ("LASES BY ITSELF" if sl.lases else
                   "Q-switches if the seed is missing" if sl.lases_without_seed else "no self-lasing")
        rt = sl.noise_round_trips if sl.lases else sl.unseeded_noise_round_trips
        out.append(f"self-lasing: {verdict} (closed with the cell {sl.closed_state}; noise reaches 1 % "
                   f"of the stored energy in {rt if rt is not None else 'no'} round trips; closed "
                   f"{sl.closed_round_trips} round trips between seed pulses, {sl.unseeded_round_trips} "
                   "without a seed)")
    s = plan.spectrum
    if s is not None:
        out.append(f"spectrum: {s.input_fwhm_m * 1e9:.3g} nm in, {s.output_fwhm_m * 1e9:.3g} nm out at "
                   f"{s.output_center_m * 1e9:.4g} nm (gain line {s.gain_line_fwhm_m * 1e9:.3g} nm at "
                   f"{s.gain_line_center_m * 1e9:.4g} nm); shortest compressed pulse "
                   f"{s.transform_limited_fwhm_s * 1e15:.3g} fs (input {s.input_transform_limited_fwhm_s * 1e15:.3g} fs)")
    a = plan.ase
    if a is not None:
        out.append(f"ASE: {a.energy_J:.3g} J leaves with the pulse (pulse/ASE energy {a.ratio:.3g}, "
                   f"peak over the ns pedestal {a.pedestal_ratio:.3g}; a 1e6 energy ratio needs a seed of "
                   f"about {a.seed_energy_for_ratio_J:.3g} J; an upper bound)")
    return out


def plot_spectrum(plan, path: str) -> None:
    """Input and output spectra (normalised) against wavelength, PNG at ``path``."""
    from regentime.reports.plots import _pyplot, save_figure

    s = plan.spectrum
    plt = _pyplot(path)
    fig, ax = plt.subplots(figsize=(7, 4))
    lam = s.wavelength_m * 1e9
    ax.plot(lam, s.input_spectrum / s.input_spectrum.max(), label=f"seed ({s.input_fwhm_m * 1e9:.3g} nm)")
    ax.plot(lam, s.output_spectrum / s.output_spectrum.max(),
            label=f"switched out ({s.output_fwhm_m * 1e9:.3g} nm)")
    ax.set_xlabel("wavelength (nm)")
    ax.set_ylabel("spectral energy (normalised)")
    ax.set_title("Spectrum after the build-up")
    ax.legend()
    fig.tight_layout()
    save_figure(fig, path)
    plt.close(fig)
