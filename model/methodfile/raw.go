package methodfile

// The file's shape, with pointers for optional keys so that presence is known.

type rawColumn struct {
	LengthM     *float64 `toml:"length_m"`
	DiameterMM  *float64 `toml:"diameter_mm"`
	FilmUM      *float64 `toml:"film_um"`
	Phase       *string  `toml:"phase,omitempty"`
	MaxTempC    *float64 `toml:"max_temp_c"`
	Diffusivity *float64 `toml:"stationary_diffusivity_m2_s,omitempty"`
	PlateHeight *float64 `toml:"plate_height_factor,omitempty"`
	CapacityNG  *float64 `toml:"capacity_ng,omitempty"`
	Kind        *string  `toml:"kind,omitempty"`
	MaxIsoC     *float64 `toml:"max_isothermal_c,omitempty"`
	ParticleUM  *float64 `toml:"particle_um,omitempty"`
	Porosity    *float64 `toml:"porosity,omitempty"`
	PhaseRatio  *float64 `toml:"phase_ratio,omitempty"`
	EddyLambda  *float64 `toml:"eddy_lambda,omitempty"`
	ObstrGamma  *float64 `toml:"obstruction_gamma,omitempty"`
	MobileOmega *float64 `toml:"mobile_omega,omitempty"`
}

type rawCarrier struct {
	Gas         *string  `toml:"gas"`
	Mode        *string  `toml:"mode"`
	FlowMLMin   *float64 `toml:"flow_ml_min,omitempty"`
	InletKPa    *float64 `toml:"inlet_kpa,omitempty"`
	Outlet      *string  `toml:"outlet,omitempty"`
	AmbientKPa  *float64 `toml:"ambient_kpa,omitempty"`
	InitialBand *float64 `toml:"initial_band_s,omitempty"`
}

type rawRamp struct {
	RateCMin *float64 `toml:"rate_c_min"`
	FinalC   *float64 `toml:"final_c"`
	HoldMin  *float64 `toml:"hold_min,omitempty"`
}

type rawOven struct {
	InitialC       *float64  `toml:"initial_c"`
	InitialHoldMin *float64  `toml:"initial_hold_min,omitempty"`
	Ramp           []rawRamp `toml:"ramp,omitempty"`
}

type rawLimits struct {
	OvenMinC         *float64      `toml:"oven_min_c,omitempty"`
	MaxRateCMin      *float64      `toml:"max_rate_c_min,omitempty"`
	MaxHoldMin       *float64      `toml:"max_hold_min,omitempty"`
	AmbientC         *float64      `toml:"ambient_c,omitempty"`
	CooldownTauMin   *float64      `toml:"cooldown_tau_min,omitempty"`
	EquilibrationMin *float64      `toml:"equilibration_min,omitempty"`
	MaxInletKPa      *float64      `toml:"max_inlet_kpa,omitempty"`
	CoolantC         *float64      `toml:"coolant_c,omitempty"`
	MinInletKPa      *float64      `toml:"min_inlet_kpa,omitempty"`
	MinFlowMLMin     *float64      `toml:"min_flow_ml_min,omitempty"`
	MaxFlowMLMin     *float64      `toml:"max_flow_ml_min,omitempty"`
	TempStepC        *float64      `toml:"temp_step_c,omitempty"`
	RateStepCMin     *float64      `toml:"rate_step_c_min,omitempty"`
	HoldStepMin      *float64      `toml:"hold_step_min,omitempty"`
	FlowStepMLMin    *float64      `toml:"flow_step_ml_min,omitempty"`
	PressureStepKPa  *float64      `toml:"pressure_step_kpa,omitempty"`
	RateBand         []rawRateBand `toml:"rate_band,omitempty"`
}

type rawRateBand struct {
	AboveC      *float64 `toml:"above_c"`
	MaxRateCMin *float64 `toml:"max_rate_c_min"`
}

type rawRobust struct {
	OvenOffsetC     *float64 `toml:"oven_offset_c,omitempty"`
	FlowPct         *float64 `toml:"flow_pct,omitempty"`
	EfficiencyPct   *float64 `toml:"efficiency_pct,omitempty"`
	RetentionSigma  *float64 `toml:"retention_sigma,omitempty"`
	PriorDHkJ       *float64 `toml:"prior_dH_kJ_mol,omitempty"`
	PriorDS         *float64 `toml:"prior_dS_J_mol_K,omitempty"`
	RetentionTimeSD *float64 `toml:"retention_time_sd_min,omitempty"`
}

type rawGoal struct {
	MinResolution *float64   `toml:"min_resolution,omitempty"`
	Objective     *string    `toml:"objective,omitempty"`
	Ramps         *int64     `toml:"ramps,omitempty"`
	TailMin       *float64   `toml:"tail_min,omitempty"`
	Lock          []string   `toml:"lock"`
	MinFirstK     *float64   `toml:"min_first_k,omitempty"`
	BakeoutC      *float64   `toml:"bakeout_c,omitempty"`
	BakeoutMin    *float64   `toml:"bakeout_min,omitempty"`
	Robust        *rawRobust `toml:"robust,omitempty"`
}

type rawInjection struct {
	VolumeUL      *float64 `toml:"volume_ul,omitempty"`
	SplitRatio    *float64 `toml:"split_ratio,omitempty"`
	InletTempC    *float64 `toml:"inlet_temp_c,omitempty"`
	DetectorTempC *float64 `toml:"detector_temp_c,omitempty"`
}

type rawCompound struct {
	Name           *string  `toml:"name"`
	Formula        *string  `toml:"formula,omitempty"`
	AromaticRings  *int64   `toml:"aromatic_rings,omitempty"`
	DHkJ           *float64 `toml:"dH_kJ_mol,omitempty"`
	DS             *float64 `toml:"dS_J_mol_K,omitempty"`
	DCp            *float64 `toml:"dCp_J_mol_K,omitempty"`
	RefTempC       *float64 `toml:"ref_temp_c,omitempty"`
	Amount         *float64 `toml:"amount,omitempty"`
	Target         *bool    `toml:"target,omitempty"`
	Concentration  *float64 `toml:"concentration_mg_ml,omitempty"`
	AlkaneCarbons  *int64   `toml:"alkane_carbons,omitempty"`
	RetentionIndex *float64 `toml:"retention_index,omitempty"`
	IndexTempC     *float64 `toml:"index_temp_c,omitempty"`
	DHSE           *float64 `toml:"dH_se_kJ_mol,omitempty"`
	DSSE           *float64 `toml:"dS_se_J_mol_K,omitempty"`
	DHDSCorr       *float64 `toml:"dH_dS_corr,omitempty"`
}

type rawMethod struct {
	Title     *string       `toml:"title,omitempty"`
	Notes     *string       `toml:"notes,omitempty"`
	Column    *rawColumn    `toml:"column"`
	Carrier   *rawCarrier   `toml:"carrier"`
	Oven      *rawOven      `toml:"oven"`
	Limits    *rawLimits    `toml:"limits,omitempty"`
	Goal      *rawGoal      `toml:"goal,omitempty"`
	Injection *rawInjection `toml:"injection,omitempty"`
	Compound  []rawCompound `toml:"compound"`
}
