// CODATA 2018 (Tiesinga et al. 2021, Rev. Mod. Phys. 93, 025010); exact in the 2019 SI.
export const PLANCK_CONSTANT_J_S = 6.62607015e-34;
export const SPEED_OF_LIGHT_M_PER_S = 299792458;
export const BOLTZMANN_CONSTANT_J_PER_K = 1.380649e-23;
